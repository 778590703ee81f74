import { LEVEL_BINS, LEVEL_MIN, LEVEL_STEP } from './levels'
import { ireToCode8 } from './scales'

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

/** Density row (0 = WAVEFORM_IRE_BOTTOM) of a level in 8-bit-equivalent codes, clamped to the axis. */
export function waveformRow(code8: number): number {
  const c0 = ireToCode8(WAVEFORM_IRE_BOTTOM)
  const perCode = WAVEFORM_ROWS / (ireToCode8(WAVEFORM_IRE_TOP) - c0)
  // The small nudge keeps a level exactly on a row boundary (7.5 or 100 IRE) in the row it
  // names rather than one below through rounding of the IRE-to-code factors.
  const k = Math.floor((code8 - c0) * perCode + 1e-7)
  return k < 0 ? 0 : k >= WAVEFORM_ROWS ? WAVEFORM_ROWS - 1 : k
}

/**
 * Level-bin index (levels.ts) → offset of its waveform row in a row-major density. The trace
 * is placed by the level bin's centre, so the waveform and the statistics share one grid.
 */
export function waveformRowOffsets(columns: number): Int32Array {
  const out = new Int32Array(LEVEL_BINS)
  for (let i = 0; i < LEVEL_BINS; i++) out[i] = waveformRow(LEVEL_MIN + i * LEVEL_STEP) * columns
  return out
}
