import type { RowBuffers } from './decode'
import type { VectorscopeDensity } from './types'

export const VECTORSCOPE_SIZE = 256
/** ±0.7 on the U/V scale holds 100 % bars (amplitude 0.632) with room for illegal chroma. */
export const VECTORSCOPE_EXTENT = 0.7

export interface VectorscopeAccumulator {
  addRow: (row: RowBuffers, width: number, uK: number, vK: number) => void
  result: () => VectorscopeDensity
}

/** Grid cell of a (U, V) point; row 0 is +V (top of the picture). */
export function vectorscopeCell(u: number, v: number, size = VECTORSCOPE_SIZE, extent = VECTORSCOPE_EXTENT): { col: number, row: number } {
  const s = size / (2 * extent)
  return { col: Math.floor((u + extent) * s), row: Math.floor((extent - v) * s) }
}

export function newVectorscopeAccumulator(): VectorscopeAccumulator {
  const size = VECTORSCOPE_SIZE
  const data = new Uint32Array(size * size)
  const s = size / (2 * VECTORSCOPE_EXTENT)
  const last = size - 1
  return {
    addRow(buf, width, uK, vK) {
      const { pb: PB, pr: PR } = buf
      for (let x = 0; x < width; x++) {
        let c = Math.floor((uK * PB[x]! + VECTORSCOPE_EXTENT) * s)
        let r = Math.floor((VECTORSCOPE_EXTENT - vK * PR[x]!) * s)
        c = c < 0 ? 0 : c > last ? last : c
        r = r < 0 ? 0 : r > last ? last : r
        data[r * size + c]!++
      }
    },
    result: () => ({ size, extent: VECTORSCOPE_EXTENT, data }),
  }
}
