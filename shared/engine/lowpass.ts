// The gamut measured after a spatial low-pass filter, for delivery specs that follow EBU R 103's
// measurement practice: R 103 v3.0 (2020) Annex 1 recommends judging R'G'B' (and Y) levels after
// spatial filtering, so that the overshoots of a sharp edge (short transients) are not reported
// as gamut errors, and tolerates excursions over a small share of the picture (up to 1 %).
// Clause wording from memory; R 103 does not fix the filter's coefficients in what we recall, so
// the filter is our choice: a 3×3 binomial kernel ([1 2 1]/4 along a line, then across three
// lines), the smallest separable low-pass that halves a one-pixel spike in each direction and
// leaves flat areas and smooth ramps exactly as they are. Edges repeat the border pixel.
import { makeRowBuffers } from './decode'
import type { RowSource } from './decode'
import { levelBin } from './levels'

/**
 * Per-pixel max and min of the filtered R', G', B' as level distributions (8-bit-equivalent
 * codes, 16 = 0 %, 235 = 100 %), read from the frame in a second pass.
 */
export function lowpassGamutLevels(src: RowSource, rgbMaxLp: Uint32Array, rgbMinLp: Uint32Array): void {
  const { width, height } = src
  const buf = makeRowBuffers(width)
  // Three horizontally filtered rows per channel, in a ring: rows y−1, y, y+1.
  const ring = [0, 1, 2].map(() => ({ r: new Float64Array(width), g: new Float64Array(width), b: new Float64Array(width) }))
  const horiz = (row: number, out: { r: Float64Array, g: Float64Array, b: Float64Array }) => {
    src.readRow(row, buf)
    for (const [from, to] of [[buf.r, out.r], [buf.g, out.g], [buf.b, out.b]] as const) {
      const last = width - 1
      for (let x = 0; x < width; x++) {
        const a = from[x > 0 ? x - 1 : 0]!
        const c = from[x < last ? x + 1 : last]!
        // In codes: 16 + 219·v; the filter is linear, so the offset can be added after it.
        to[x] = 16 + 219 * (a + 2 * from[x]! + c) / 4
      }
    }
  }
  horiz(0, ring[1]!)
  if (height > 1) horiz(1, ring[2]!)
  for (let y = 0; y < height; y++) {
    const up = ring[(y + 0) % 3]!
    const mid = ring[(y + 1) % 3]!
    const down = y + 1 < height ? ring[(y + 2) % 3]! : mid
    const above = y > 0 ? up : mid
    for (let x = 0; x < width; x++) {
      const r = (above.r[x]! + 2 * mid.r[x]! + down.r[x]!) / 4
      const g = (above.g[x]! + 2 * mid.g[x]! + down.g[x]!) / 4
      const b = (above.b[x]! + 2 * mid.b[x]! + down.b[x]!) / 4
      rgbMaxLp[levelBin(Math.max(r, g, b))]!++
      rgbMinLp[levelBin(Math.min(r, g, b))]!++
    }
    // The row above is no longer needed: it becomes row y+2.
    if (y + 2 < height) horiz(y + 2, ring[(y + 0) % 3]!)
  }
}
