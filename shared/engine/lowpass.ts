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
import type { RowBuffers, RowSource } from './decode'
import { levelBin, LEVEL_BINS, LEVEL_MIN } from './levels'
import { max3, min3 } from './fast/kernel'
import type { LevelDistributions } from './types'
import type { DeliverySpec } from './specs'

type SpatialKey = 'rgbMaxLp' | 'rgbMinLp' | 'lumaMaxR3' | 'lumaMinR3' | 'compMaxR3' | 'compMinR3' | 'rgbMaxR3' | 'rgbMinR3'
export const SPATIAL_KEYS: readonly SpatialKey[] = ['rgbMaxLp', 'rgbMinLp', 'lumaMaxR3', 'lumaMinR3', 'compMaxR3', 'compMinR3', 'rgbMaxR3', 'rgbMinR3']

/** One row's level bins per pixel, before the horizontal step: luma, Y' ± C, largest and smallest of R', G', B'. */
interface RowBins { y: Int32Array, hi: Int32Array, lo: Int32Array, mx: Int32Array, mn: Int32Array }

/** Per row, after the horizontal step: filtered R', G', B' levels; 3-wide min or max of each quantity's level bin. */
interface BinRow {
  r: Float64Array, g: Float64Array, b: Float64Array
  yMn: Int32Array, yMx: Int32Array, hiMn: Int32Array, loMx: Int32Array, mxMn: Int32Array, mnMx: Int32Array
}

/** levelBin (levels.ts) by the same expression, for the loops below (no call, no module cell per use). */
const BIN_LAST = LEVEL_BINS - 1
const BIN_BASE = -LEVEL_MIN

/**
 * Fills the spatial distributions of `levels` (allocating them). `uK`, `vK` turn Pb, Pr into
 * U, V as the main pass does (analyse.ts), so the composite envelope is the same quantity.
 *
 * The same results as spatialLevelsReference, bin for bin, by a cheaper route: levelBin is
 * monotone, so the bin of the largest (smallest) of some levels is the largest (smallest) of
 * their bins. Each level is binned once, where it is made, and the 3×3 minima and maxima are
 * taken on integer bins, branch-free, instead of on doubles by Math.min/Math.max (which V8
 * cannot compile to a plain compare, as it must honour NaN and −0). The low-pass filter keeps
 * the reference's expressions, so its sums round the same.
 */
export function spatialLevels(src: RowSource, uK: number, vK: number, levels: LevelDistributions): void {
  const { width, height } = src
  for (const k of SPATIAL_KEYS) levels[k] = new Uint32Array(LEVEL_BINS)
  const lpMx = levels.rgbMaxLp!; const lpMn = levels.rgbMinLp!
  const yMxD = levels.lumaMaxR3!; const yMnD = levels.lumaMinR3!; const cMxD = levels.compMaxR3!; const cMnD = levels.compMinR3!
  const gMxD = levels.rgbMaxR3!; const gMnD = levels.rgbMinR3!
  const f = () => new Float64Array(width)
  const i32 = () => new Int32Array(width)
  const ring: BinRow[] = [0, 1, 2].map(() => ({ r: f(), g: f(), b: f(), yMn: i32(), yMx: i32(), hiMn: i32(), loMx: i32(), mxMn: i32(), mnMx: i32() }))
  const rowBins = { y: i32(), hi: i32(), lo: i32(), mx: i32(), mn: i32() }
  // Rows that repeat the one above (bars, graphics, letterbox) are common in what is checked:
  // eq[row] = 1 when the row reads the same as the one above. Its horizontal step is then a
  // copy, and an output row whose three rows are all repeats adds what the row before it added.
  const bufs = [makeRowBuffers(width), makeRowBuffers(width)]
  const eq = new Uint8Array(height)
  const horiz = (row: number, out: BinRow) => {
    const buf = bufs[row & 1]!
    src.readRow(row, buf)
    if (row > 0 && rowsEqual(buf, bufs[(row - 1) & 1]!, width)) {
      eq[row] = 1
      copyBinRow(ring[row % 3]!, out)
    }
    else horizBins(buf, width, rowBins, uK, vK, out)
  }
  // The bins of the last output row measured before a run of repeats, and how many times
  // (itself included) they are still to be counted.
  const idx = Array.from({ length: 8 }, i32)
  let rep = 0
  const dists = [lpMx, lpMn, yMxD, yMnD, cMxD, cMnD, gMxD, gMnD]
  const flush = () => {
    for (let d = 0; d < 8; d++) {
      const dist = dists[d]!; const at = idx[d]!
      for (let x = 0; x < width; x++) dist[at[x]!]! += rep
    }
    rep = 0
  }
  horiz(0, ring[1]!)
  if (height > 1) horiz(1, ring[2]!)
  for (let row = 0; row < height; row++) {
    // Rows row − 1, row and row + 1 (no edge repeat in reach) all repeat the row above each:
    // this output row is the last one again.
    if (rep && row + 1 < height && eq[row - 1]! & eq[row]! & eq[row + 1]!) {
      rep++
      if (row + 2 < height) horiz(row + 2, ring[row % 3]!)
      continue
    }
    if (rep) flush()
    const mid = ring[(row + 1) % 3]!
    const down = row + 1 < height ? ring[(row + 2) % 3]! : mid
    const up = row > 0 ? ring[row % 3]! : mid
    // The next output row may repeat this one: keep its bins rather than count them now.
    if (row > 0 && row + 2 < height && eq[row]! & eq[row + 1]!) {
      verticalBins(up, mid, down, width, idx)
      rep = 1
    }
    else verticalCount(up, mid, down, width, dists)
    // The row above is no longer needed: it becomes row + 2.
    if (row + 2 < height) horiz(row + 2, ring[row % 3]!)
  }
  if (rep) flush()
}

function rowsEqual(a: RowBuffers, b: RowBuffers, w: number): boolean {
  for (const k of ['y', 'pb', 'pr', 'r', 'g', 'b'] as const) {
    const p = a[k]; const q = b[k]
    for (let x = 0; x < w; x++) if (p[x] !== q[x]) return false
  }
  return true
}

function copyBinRow(from: BinRow, to: BinRow): void {
  to.r.set(from.r); to.g.set(from.g); to.b.set(from.b)
  to.yMn.set(from.yMn); to.yMx.set(from.yMx); to.hiMn.set(from.hiMn); to.loMx.set(from.loMx); to.mxMn.set(from.mxMn); to.mnMx.set(from.mnMx)
}

/** One output row: the vertical step of the filter and of the 3×3 extremes, counted into the eight distributions. */
function verticalCount(up: BinRow, mid: BinRow, down: BinRow, width: number, dists: Uint32Array[]): void {
  const [lpMx, lpMn, yMxD, yMnD, cMxD, cMnD, gMxD, gMnD] = dists as [Uint32Array, Uint32Array, Uint32Array, Uint32Array, Uint32Array, Uint32Array, Uint32Array, Uint32Array]
  const uR = up.r; const mR = mid.r; const dR = down.r; const uG = up.g; const mG = mid.g; const dG = down.g
  const uB = up.b; const mB = mid.b; const dB = down.b
  const uyMn = up.yMn; const myMn = mid.yMn; const dyMn = down.yMn; const uyMx = up.yMx; const myMx = mid.yMx; const dyMx = down.yMx
  const uhi = up.hiMn; const mhi = mid.hiMn; const dhi = down.hiMn; const ulo = up.loMx; const mlo = mid.loMx; const dlo = down.loMx
  const umx = up.mxMn; const mmx = mid.mxMn; const dmx = down.mxMn; const umn = up.mnMx; const mmn = mid.mnMx; const dmn = down.mnMx
  const base = BIN_BASE; const top = BIN_LAST
  for (let x = 0; x < width; x++) {
    let i = ((((uR[x]! + 2 * mR[x]! + dR[x]!) / 4) + base) * 4 + 0.5) | 0
    const ir = i < 0 ? 0 : i > top ? top : i
    i = ((((uG[x]! + 2 * mG[x]! + dG[x]!) / 4) + base) * 4 + 0.5) | 0
    const ig = i < 0 ? 0 : i > top ? top : i
    i = ((((uB[x]! + 2 * mB[x]! + dB[x]!) / 4) + base) * 4 + 0.5) | 0
    const ib = i < 0 ? 0 : i > top ? top : i
    lpMx[max3(ir, ig, ib)]!++
    lpMn[min3(ir, ig, ib)]!++
    yMxD[min3(uyMn[x]!, myMn[x]!, dyMn[x]!)]!++
    yMnD[max3(uyMx[x]!, myMx[x]!, dyMx[x]!)]!++
    cMxD[min3(uhi[x]!, mhi[x]!, dhi[x]!)]!++
    cMnD[max3(ulo[x]!, mlo[x]!, dlo[x]!)]!++
    gMxD[min3(umx[x]!, mmx[x]!, dmx[x]!)]!++
    gMnD[max3(umn[x]!, mmn[x]!, dmn[x]!)]!++
  }
}

/** verticalCount's bins for one output row, kept in `idx` (one array per distribution, in its order) instead of counted. */
function verticalBins(up: BinRow, mid: BinRow, down: BinRow, width: number, idx: Int32Array[]): void {
  const [lpMx, lpMn, yMxD, yMnD, cMxD, cMnD, gMxD, gMnD] = idx as [Int32Array, Int32Array, Int32Array, Int32Array, Int32Array, Int32Array, Int32Array, Int32Array]
  const base = BIN_BASE; const top = BIN_LAST
  for (let x = 0; x < width; x++) {
    let i = ((((up.r[x]! + 2 * mid.r[x]! + down.r[x]!) / 4) + base) * 4 + 0.5) | 0
    const ir = i < 0 ? 0 : i > top ? top : i
    i = ((((up.g[x]! + 2 * mid.g[x]! + down.g[x]!) / 4) + base) * 4 + 0.5) | 0
    const ig = i < 0 ? 0 : i > top ? top : i
    i = ((((up.b[x]! + 2 * mid.b[x]! + down.b[x]!) / 4) + base) * 4 + 0.5) | 0
    const ib = i < 0 ? 0 : i > top ? top : i
    lpMx[x] = max3(ir, ig, ib)
    lpMn[x] = min3(ir, ig, ib)
    yMxD[x] = min3(up.yMn[x]!, mid.yMn[x]!, down.yMn[x]!)
    yMnD[x] = max3(up.yMx[x]!, mid.yMx[x]!, down.yMx[x]!)
    cMxD[x] = min3(up.hiMn[x]!, mid.hiMn[x]!, down.hiMn[x]!)
    cMnD[x] = max3(up.loMx[x]!, mid.loMx[x]!, down.loMx[x]!)
    gMxD[x] = min3(up.mxMn[x]!, mid.mxMn[x]!, down.mxMn[x]!)
    gMnD[x] = max3(up.mnMx[x]!, mid.mnMx[x]!, down.mnMx[x]!)
  }
}

/** One row read, its levels binned, then filtered and 3-wide extremes taken along it (spatialLevels). */
function horizBins(buf: RowBuffers, w: number, rowBins: RowBins, uK: number, vK: number, out: BinRow): void {
  const { y, pb, pr, r: R, g: G, b: B } = buf
  const yB = rowBins.y; const hiB = rowBins.hi; const loB = rowBins.lo; const mxB = rowBins.mx; const mnB = rowBins.mn
  const lastX = w - 1; const base = BIN_BASE; const top = BIN_LAST; const uk = uK; const vk = vK
  for (let x = 0; x < w; x++) {
    const u = uk * pb[x]!; const v = vk * pr[x]!
    const c = 219 * Math.sqrt(u * u + v * v)
    const yy = y[x]!
    let i = ((yy + base) * 4 + 0.5) | 0
    yB[x] = i < 0 ? 0 : i > top ? top : i
    i = ((yy + c + base) * 4 + 0.5) | 0
    hiB[x] = i < 0 ? 0 : i > top ? top : i
    i = ((yy - c + base) * 4 + 0.5) | 0
    loB[x] = i < 0 ? 0 : i > top ? top : i
    i = ((16 + 219 * R[x]! + base) * 4 + 0.5) | 0
    const ir = i < 0 ? 0 : i > top ? top : i
    i = ((16 + 219 * G[x]! + base) * 4 + 0.5) | 0
    const ig = i < 0 ? 0 : i > top ? top : i
    i = ((16 + 219 * B[x]! + base) * 4 + 0.5) | 0
    const ib = i < 0 ? 0 : i > top ? top : i
    mxB[x] = max3(ir, ig, ib); mnB[x] = min3(ir, ig, ib)
  }
  const { r: oR, g: oG, b: oB, yMn, yMx, hiMn, loMx, mxMn, mnMx } = out
  // Edges repeat the border pixel; between them, each neighbour is read once and carried.
  let yA = yB[0]!; let yX = yA; let hA = hiB[0]!; let hX = hA; let lA = loB[0]!; let lX = lA
  let xA = mxB[0]!; let xX = xA; let nA = mnB[0]!; let nX = nA
  let rA = R[0]!; let rX = rA; let gA = G[0]!; let gX = gA; let bA = B[0]!; let bX = bA
  for (let x = 0; x < w; x++) {
    const c = x < lastX ? x + 1 : lastX
    const yC = yB[c]!; const hC = hiB[c]!; const lC = loB[c]!; const xC = mxB[c]!; const nC = mnB[c]!
    const rC = R[c]!; const gC = G[c]!; const bC = B[c]!
    // In codes: 16 + 219·v; the filter is linear, so the offset can be added after it.
    oR[x] = 16 + 219 * (rA + 2 * rX + rC) / 4
    oG[x] = 16 + 219 * (gA + 2 * gX + gC) / 4
    oB[x] = 16 + 219 * (bA + 2 * bX + bC) / 4
    yMn[x] = min3(yA, yX, yC); yMx[x] = max3(yA, yX, yC)
    hiMn[x] = min3(hA, hX, hC); loMx[x] = max3(lA, lX, lC)
    mxMn[x] = min3(xA, xX, xC); mnMx[x] = max3(nA, nX, nC)
    yA = yX; yX = yC; hA = hX; hX = hC; lA = lX; lX = lC; xA = xX; xX = xC; nA = nX; nX = nC
    rA = rX; rX = rC; gA = gX; gX = gC; bA = bX; bX = bC
  }
}

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
 * The plain statement of the pass, kept for the tests, which hold spatialLevels to it bin for
 * bin: every extreme taken on the levels themselves, then binned.
 */
export function spatialLevelsReference(src: RowSource, uK: number, vK: number, levels: LevelDistributions): void {
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
