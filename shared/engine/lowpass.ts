// Second pass over the rows for limits that look at the picture's space, not single pixels:
//
// 1. The gamut after a spatial low-pass filter, for delivery specs that follow EBU R 103's
//    measurement practice: R 103 v3.0 (2020) Annex 1 recommends judging R'G'B' levels after
//    spatial filtering, so that the overshoots of a sharp edge (short transients) are not
//    reported as gamut errors, and tolerates excursions over a small share of the picture (up to
//    1 %). Clause wording from memory; R 103 does not fix the filter's coefficients in what we
//    recall, so the filter is our choice: a 3×3 binomial kernel ([1 2 1]/4 along a line, then
//    across three lines), the smallest separable low-pass that halves a one-pixel spike in each
//    direction and leaves flat areas and smooth ramps exactly as they are.
// 2. A minimum region: a pixel counts beyond a limit only when the whole 3×3 block around it is
//    beyond (for a max bound, the block's minimum exceeds the threshold), so a lone hot pixel or a
//    one- or two-pixel line is ignored where the client allows. These are the 3×3 minimum (for
//    max bounds) and maximum (for min bounds) of luma, the composite envelope and R'G'B'.
// Edges repeat the border pixel. Distributions are on the level bins of levels.ts, so every
// threshold can be judged later from them (re-judging), as for the per-pixel ones.
import { makeRowBuffers } from './decode'
import type { RowSource } from './decode'
import { levelBin, LEVEL_BINS } from './levels'
import type { LevelDistributions } from './types'
import type { DeliverySpec } from './specs'

type SpatialKey = 'rgbMaxLp' | 'rgbMinLp' | 'lumaMaxR3' | 'lumaMinR3' | 'compMaxR3' | 'compMinR3' | 'rgbMaxR3' | 'rgbMinR3'
export const SPATIAL_KEYS: readonly SpatialKey[] = ['rgbMaxLp', 'rgbMinLp', 'lumaMaxR3', 'lumaMinR3', 'compMaxR3', 'compMinR3', 'rgbMaxR3', 'rgbMinR3']

/** Per row, after the horizontal step: filtered R', G', B'; 3-wide min of each "max" quantity and max of each "min" quantity. */
interface Row {
  r: Float64Array, g: Float64Array, b: Float64Array
  yMn: Float64Array, yMx: Float64Array, hiMn: Float64Array, loMx: Float64Array, mxMn: Float64Array, mnMx: Float64Array
}

/** Whether a spec judges any limit on the spatial distributions (low-pass filter or 3×3 region). */
export function specUsesSpatial(spec: Pick<DeliverySpec, 'limits'>): boolean {
  return spec.limits.some((l) => l.filter === 'lowpass' || l.minRegion === '3x3')
}

/**
 * Fills the spatial distributions of `levels` (allocating them). `uK`, `vK` turn Pb, Pr into
 * U, V as the main pass does (analyse.ts), so the composite envelope is the same quantity.
 */
export function spatialLevels(src: RowSource, uK: number, vK: number, levels: LevelDistributions): void {
  const { width, height } = src
  for (const k of SPATIAL_KEYS) levels[k] = new Uint32Array(LEVEL_BINS)
  const lp = { mx: levels.rgbMaxLp!, mn: levels.rgbMinLp! }
  const rg = { yMx: levels.lumaMaxR3!, yMn: levels.lumaMinR3!, cMx: levels.compMaxR3!, cMn: levels.compMinR3!, gMx: levels.rgbMaxR3!, gMn: levels.rgbMinR3! }
  const buf = makeRowBuffers(width)
  const f = () => new Float64Array(width)
  const ring: Row[] = [0, 1, 2].map(() => ({ r: f(), g: f(), b: f(), yMn: f(), yMx: f(), hiMn: f(), loMx: f(), mxMn: f(), mnMx: f() }))
  const y = f(); const hi = f(); const lo = f(); const mx = f(); const mn = f()
  const last = width - 1
  const horiz = (row: number, out: Row) => {
    src.readRow(row, buf)
    for (let x = 0; x < width; x++) {
      const u = uK * buf.pb[x]!; const v = vK * buf.pr[x]!
      const c = 219 * Math.sqrt(u * u + v * v)
      const yy = buf.y[x]!
      y[x] = yy; hi[x] = yy + c; lo[x] = yy - c
      const r = 16 + 219 * buf.r[x]!; const g = 16 + 219 * buf.g[x]!; const b = 16 + 219 * buf.b[x]!
      mx[x] = Math.max(r, g, b); mn[x] = Math.min(r, g, b)
    }
    for (const [from, to] of [[buf.r, out.r], [buf.g, out.g], [buf.b, out.b]] as const) {
      for (let x = 0; x < width; x++) {
        // In codes: 16 + 219·v; the filter is linear, so the offset can be added after it.
        to[x] = 16 + 219 * (from[x > 0 ? x - 1 : 0]! + 2 * from[x]! + from[x < last ? x + 1 : last]!) / 4
      }
    }
    for (let x = 0; x < width; x++) {
      const a = x > 0 ? x - 1 : 0; const c = x < last ? x + 1 : last
      out.yMn[x] = Math.min(y[a]!, y[x]!, y[c]!); out.yMx[x] = Math.max(y[a]!, y[x]!, y[c]!)
      out.hiMn[x] = Math.min(hi[a]!, hi[x]!, hi[c]!); out.loMx[x] = Math.max(lo[a]!, lo[x]!, lo[c]!)
      out.mxMn[x] = Math.min(mx[a]!, mx[x]!, mx[c]!); out.mnMx[x] = Math.max(mn[a]!, mn[x]!, mn[c]!)
    }
  }
  horiz(0, ring[1]!)
  if (height > 1) horiz(1, ring[2]!)
  for (let row = 0; row < height; row++) {
    const mid = ring[(row + 1) % 3]!
    const down = row + 1 < height ? ring[(row + 2) % 3]! : mid
    const up = row > 0 ? ring[row % 3]! : mid
    for (let x = 0; x < width; x++) {
      const r = (up.r[x]! + 2 * mid.r[x]! + down.r[x]!) / 4
      const g = (up.g[x]! + 2 * mid.g[x]! + down.g[x]!) / 4
      const b = (up.b[x]! + 2 * mid.b[x]! + down.b[x]!) / 4
      lp.mx[levelBin(Math.max(r, g, b))]!++
      lp.mn[levelBin(Math.min(r, g, b))]!++
      rg.yMx[levelBin(Math.min(up.yMn[x]!, mid.yMn[x]!, down.yMn[x]!))]!++
      rg.yMn[levelBin(Math.max(up.yMx[x]!, mid.yMx[x]!, down.yMx[x]!))]!++
      rg.cMx[levelBin(Math.min(up.hiMn[x]!, mid.hiMn[x]!, down.hiMn[x]!))]!++
      rg.cMn[levelBin(Math.max(up.loMx[x]!, mid.loMx[x]!, down.loMx[x]!))]!++
      rg.gMx[levelBin(Math.min(up.mxMn[x]!, mid.mxMn[x]!, down.mxMn[x]!))]!++
      rg.gMn[levelBin(Math.max(up.mnMx[x]!, mid.mnMx[x]!, down.mnMx[x]!))]!++
    }
    // The row above is no longer needed: it becomes row + 2.
    if (row + 2 < height) horiz(row + 2, ring[row % 3]!)
  }
}
