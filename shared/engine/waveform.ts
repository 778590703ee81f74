import type { RowBuffers } from './decode'
import { ireToCode8 } from './scales'
import type { WaveformDensity } from './types'

/** The waveform's vertical axis: room for sync-tip-deep composite lows and 100 % bar peaks. */
export const WAVEFORM_IRE_BOTTOM = -40
export const WAVEFORM_IRE_TOP = 140
export const WAVEFORM_ROWS = 360
/** Wider pictures are folded by an integer factor so a density stays under this many columns. */
export const WAVEFORM_MAX_COLUMNS = 1024

export function waveformGeometry(width: number): { columns: number, decimation: number } {
  const decimation = Math.max(1, Math.ceil(width / WAVEFORM_MAX_COLUMNS))
  return { columns: Math.ceil(width / decimation), decimation }
}

export interface WaveformAccumulator {
  addRow: (row: RowBuffers, uK: number, vK: number) => void
  result: () => WaveformDensity
}

export function newWaveformAccumulator(width: number): WaveformAccumulator {
  const { columns, decimation } = waveformGeometry(width)
  const rows = WAVEFORM_ROWS
  const size = columns * rows
  const luma = new Uint32Array(size)
  const flat = new Uint32Array(size)
  const rr = new Uint32Array(size)
  const gg = new Uint32Array(size)
  const bb = new Uint32Array(size)
  // row = (code8 − code8(bottom)) · rows / code8 span, so one multiply-add per trace.
  const c0 = ireToCode8(WAVEFORM_IRE_BOTTOM)
  const perCode = rows / (ireToCode8(WAVEFORM_IRE_TOP) - c0)
  // A level exactly on a row boundary (7.5 or 100 IRE) must land in the row it names, not
  // one below through rounding of the IRE-to-code factors.
  const c0e = c0 - 1e-9
  const last = rows - 1
  const colOf = new Int32Array(width)
  for (let x = 0; x < width; x++) colOf[x] = Math.floor(x / decimation)
  return {
    addRow(buf, uK, vK) {
      const { y: Y, pb: PB, pr: PR, r: R, g: G, b: B } = buf
      for (let x = 0; x < width; x++) {
        const col = colOf[x]!
        const y = Y[x]!
        const u = uK * PB[x]!; const v = vK * PR[x]!
        const c = 219 * Math.sqrt(u * u + v * v)
        let k = Math.floor((y - c0e) * perCode); luma[(k < 0 ? 0 : k > last ? last : k) * columns + col]!++
        k = Math.floor((y + c - c0e) * perCode); flat[(k < 0 ? 0 : k > last ? last : k) * columns + col]!++
        k = Math.floor((y - c - c0e) * perCode); flat[(k < 0 ? 0 : k > last ? last : k) * columns + col]!++
        k = Math.floor((16 + 219 * R[x]! - c0e) * perCode); rr[(k < 0 ? 0 : k > last ? last : k) * columns + col]!++
        k = Math.floor((16 + 219 * G[x]! - c0e) * perCode); gg[(k < 0 ? 0 : k > last ? last : k) * columns + col]!++
        k = Math.floor((16 + 219 * B[x]! - c0e) * perCode); bb[(k < 0 ? 0 : k > last ? last : k) * columns + col]!++
      }
    },
    result: () => ({
      columns, rows, ireBottom: WAVEFORM_IRE_BOTTOM, ireTop: WAVEFORM_IRE_TOP, decimation,
      luma, flat, rgb: { r: rr, g: gg, b: bb },
    }),
  }
}
