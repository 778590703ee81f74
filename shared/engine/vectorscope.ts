export const VECTORSCOPE_SIZE = 256
/** ±0.7 on the U/V scale holds 100 % bars (amplitude 0.632) with room for illegal chroma. */
export const VECTORSCOPE_EXTENT = 0.7

/** Grid cell of a (U, V) point; row 0 is +V (top of the picture). */
export function vectorscopeCell(u: number, v: number, size = VECTORSCOPE_SIZE, extent = VECTORSCOPE_EXTENT): { col: number, row: number } {
  const s = size / (2 * extent)
  return { col: Math.floor((u + extent) * s), row: Math.floor((extent - v) * s) }
}
