// Fast kernels for the common inputs (8-bit R'G'B', UYVY, v210): the same arithmetic as the
// reference pass in analyse.ts, read straight from the source bytes, with vertical runs folded.
//
// Why runs: pictures brought to a level check (bars, slates, graphics, letterbox, animation)
// repeat a sample straight down the frame far more often than not, and every accumulator of
// the analysis is a function of the source codes alone. So each column of a stripe keeps the
// bins of its last source unit and a count of how many rows in a row repeated it; the
// increments are made once per run. A unit is one pixel of R'G'B', one UYVY pair (one 32-bit
// word) or one v210 group of six pixels (four words), so a repeat costs one compare per unit.
// Where nothing repeats (grain, noise) each unit is flushed with a count of one.
//
// Every bin and extreme is computed by the reference's own expressions in the same order,
// or by a route proven to land on the same value (per-code tables and counts, integer level
// bins away from bin edges, branch-free max/min of bins), so the results are bit for bit
// those of the reference pass, except the luma sum of 8-bit R'G'B', which is added as
// y·count per run and may differ from the reference's pixel-by-pixel sum in the last bits
// (Y'CbCr luma is a multiple of 1/4, so its sums are exact either way).
//
// Why the care over branches: on grain every out-of-range test and max/min would be a coin
// toss for the branch predictor, which costs more than the arithmetic they guard.
import { COMP_HI, COMP_LO, HIGH_CHROMA, HIGH_LUMA, LOW_BAND, LV_OFF, LV_SCALE, VS_LAST, VS_SCALE } from './accumulate'
import type { Accumulators } from './accumulate'
import { v210Stride } from './decode'
import { MATRICES } from './matrix'
import { VECTORSCOPE_EXTENT, VECTORSCOPE_SIZE } from './vectorscope'
import type { FrameInput, MatrixName } from './types'
import { MASK_HIGH, MASK_LOW } from './mask'
import type { MaskLimits } from './mask'

const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1

class Kernel {
  readonly wave: boolean
  readonly dl: Uint32Array; readonly dhi: Uint32Array; readonly dlo: Uint32Array; readonly dmx: Uint32Array; readonly dmn: Uint32Array
  readonly dr: Uint32Array; readonly dg: Uint32Array; readonly db: Uint32Array
  readonly cbH: Uint32Array; readonly crH: Uint32Array
  readonly wl: Uint32Array; readonly wf: Uint32Array; readonly wr: Uint32Array; readonly wg: Uint32Array; readonly wb: Uint32Array
  readonly vec: Uint32Array; readonly rowOff: Int32Array; readonly colOf: Int32Array
  readonly mask: Uint8Array; readonly maskCol: Int32Array; readonly maskRow: Int32Array; readonly lim: MaskLimits
  readonly uK: number; readonly vK: number; readonly rK: number; readonly bK: number; readonly gR: number; readonly gB: number
  readonly cbOff: number; readonly hs: number; readonly gamHi: number; readonly gamLo: number
  sumY = 0; yMin: number; yMax: number; cbMin: number; cbMax: number; crMin: number; crMax: number
  compMin: number; compMax: number; cMax: number
  compOut = 0; gamOut = 0; studOut = 0

  constructor(acc: Accumulators) {
    const { levels: lv, dens, coef: k, t } = acc
    this.dl = lv.luma; this.dhi = lv.compMax; this.dlo = lv.compMin; this.dmx = lv.rgbMax; this.dmn = lv.rgbMin
    this.dr = lv.r; this.dg = lv.g; this.db = lv.b
    this.cbH = acc.cbHist; this.crH = acc.crHist
    this.wave = dens !== undefined
    const none = new Uint32Array(0)
    this.wl = dens?.luma ?? none; this.wf = dens?.flat ?? none
    this.wr = dens?.r ?? none; this.wg = dens?.g ?? none; this.wb = dens?.b ?? none
    this.vec = dens?.vector ?? none
    this.rowOff = dens?.rowOff ?? new Int32Array(0); this.colOf = dens?.colOf ?? new Int32Array(0)
    this.mask = dens?.mask ?? new Uint8Array(0); this.maskCol = dens?.maskCol ?? new Int32Array(0); this.maskRow = dens?.maskRow ?? new Int32Array(0)
    this.lim = dens?.lim ?? { yHi: 0, yLo: 0, cHi: 0, cLo: 0, rgbHi: 0, rgbLo: 0, cbHi: 0, cbLo: 0, crHi: 0, crLo: 0 }
    this.uK = k.uK; this.vK = k.vK; this.rK = k.rK; this.bK = k.bK; this.gR = k.gR; this.gB = k.gB
    this.cbOff = k.cbOff; this.hs = k.hs; this.gamHi = k.gamHi; this.gamLo = k.gamLo
    this.yMin = t.yMin; this.yMax = t.yMax; this.cbMin = t.cbMin; this.cbMax = t.cbMax; this.crMin = t.crMin; this.crMax = t.crMax
    this.compMin = t.compMin; this.compMax = t.compMax; this.cMax = t.cMax
  }

  finish(acc: Accumulators): void {
    const t = acc.t
    t.sumY += this.sumY; t.yMin = this.yMin; t.yMax = this.yMax; t.compMin = this.compMin; t.compMax = this.compMax
    t.cbMin = this.cbMin; t.cbMax = this.cbMax; t.crMin = this.crMin; t.crMax = this.crMax; t.cMax = this.cMax
    t.compositeOut += this.compOut; t.gamutOut += this.gamOut; t.studioOut += this.studOut
  }
}

/**
 * Runs the fast kernel for `input` when there is one; false leaves the work to the reference
 * pass. `stripe` is the stripe width in pixels (a multiple of 48, whole v210 groups).
 */
export function fastPass(input: FrameInput, matrix: MatrixName, acc: Accumulators, stripe: number): boolean {
  const k = new Kernel(acc)
  if (input.kind === 'rgb' && input.bitDepth === 8) {
    const { tb, ch } = rgb8(input.data as Uint8Array, input.width, input.height, input.channels, input.range === 'full', matrix, k, stripe)
    tb.finish(k)
    ch.fold(k)
  }
  // The per-code tables are folded here rather than at the end of the kernels: V8 compiles
  // a kernel while its loop runs (on-stack replacement), before the code after the loop has
  // ever run, and a call there with no type feedback deoptimised the kernel on every frame.
  else if (input.kind === 'uyvy') uyvy(input.data, input.width, input.height, k, stripe).finish(k)
  else if (input.kind === 'v210') v210(input.data, input.width, input.height, k, stripe).finish(k)
  else return false
  k.finish(acc)
  return true
}

// Each kernel holds, per unit of the current stripe, the unit's source key and how many rows
// in a row carried it. Units whose run has ended are queued (column, codes, count) and
// measured a row's worth at a time by one of the two batch functions below, which keep every
// constant and running total in locals: with no repeats at all (noise, grain) that is one
// queue entry per unit, and the batch loop is as tight as a plain per-pixel pass.

// Branch-free integer max/min of three level bins. On noise, data-dependent branches are
// mispredicted about half the time and cost more than all the arithmetic; the bin of
// y + max(ro, go, bo) is the max of the three bins because rounding and truncation are monotone.
function max3(a: number, b: number, c: number): number {
  let d = a - b
  const m = a - (d & (d >> 31))
  d = m - c
  return m - (d & (d >> 31))
}

function min3(a: number, b: number, c: number): number {
  let d = a - b
  const m = b + (d & (d >> 31))
  d = m - c
  return c + (d & (d >> 31))
}

/** Marks mask column `mc` on the rows rowEnd − n … rowEnd − 1 (a run that ended before rowEnd). */
function markRun(k: Kernel, mc: number, rowEnd: number, n: number, mark: number): void {
  const { mask, maskRow } = k
  for (let r = rowEnd - n; r < rowEnd; r++) mask[maskRow[r]! + mc]! |= mark
}

/** The queue of ended runs: column, the unit's codes, and the run length. */
class Queue {
  len = 0
  readonly x: Int32Array
  readonly a: Int32Array
  readonly b: Int32Array
  readonly c: Int32Array
  readonly d: Int32Array
  readonly n: Int32Array
  constructor(size: number) {
    this.x = new Int32Array(size); this.a = new Int32Array(size); this.b = new Int32Array(size)
    this.c = new Int32Array(size); this.d = new Int32Array(size); this.n = new Int32Array(size)
  }
}

/**
 * Measures queued R'G'B' pixels (a, b, c = R, G, B codes; n = run length) with the
 * reference's arithmetic: luma and the R'/G'/B' levels per pixel, chroma looked up by the
 * pair of code differences (RgbChroma) and counted per pair.
 */
function rgbBatch(k: Kernel, q: Queue, tb: RgbTables, ch: RgbChroma, bT: Uint8Array, rowC: Int32Array, rowEnd: number): void {
  const { wave, rowOff, colOf, maskCol } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo } = k.lim
  const { dl, dhi, dlo, wl, wf, wr, wg, wb } = k
  const { S, bin, out: gOut, cR, cG, cB, cMx, cMn } = tb
  const { tc, cnt } = ch
  // Module constants as locals: an imported binding is a cell load with a hole check on
  // every use, which V8 would otherwise repeat per pixel in the loop below.
  const lvScale = LV_SCALE; const lvOff = LV_OFF; const compHi = COMP_HI; const compLo = COMP_LO
  const lowBand = LOW_BAND; const highLuma = HIGH_LUMA; const keyBase = KEY_BASE
  let sumY = 0; let yMin = k.yMin; let yMax = k.yMax; let compMin = k.compMin; let compMax = k.compMax
  let compOut = 0; let gamOut = 0; let studOut = 0
  const { x: QX, a: QR, b: QG, c: QB, n: QN } = q
  for (let e = 0, len = q.len; e < len; e++) {
    const n = QN[e]!
    const R = QR[e]!; const G = QG[e]!; const B = QB[e]!
    const key = R * 511 - G * 512 + B + keyBase
    const t = tc[2 * key]!; const c = tc[2 * key + 1]!
    const bits = bT[key]!
    cnt[key]! += n
    const y = 16 + 219 * (S[G]! + t)
    sumY += y * n
    yMin = Math.min(yMin, y); yMax = Math.max(yMax, y)
    const hi = y + c; const lo = y - c
    compMax = Math.max(compMax, hi); compMin = Math.min(compMin, lo)
    const iy = (y * lvScale + lvOff) | 0
    const ihi = (hi * lvScale + lvOff) | 0
    const ilo = (lo * lvScale + lvOff) | 0
    dl[iy]! += n
    dhi[ihi]! += n
    dlo[ilo]! += n
    cR[R]! += n
    cG[G]! += n
    cB[B]! += n
    const mxc = max3(R, G, B); const mnc = min3(R, G, B)
    cMx[mxc]! += n
    cMn[mnc]! += n
    compOut += (+(hi > compHi) | +(lo < compLo)) * n
    gamOut += (gOut[R]! | gOut[G]! | gOut[B]!) * n
    studOut += ((bits & 1) | +(y < lowBand) | +(y >= highLuma)) * n
    if (wave) {
      const x = QX[e]!
      const mark = (((bits >> 1) & 1) | +(iy >= yHi) | +(ihi >= cHi) | +(bin[mxc]! >= rgbHi)) * MASK_HIGH
        | ((bits >> 2) | +(iy <= yLo) | +(ilo <= cLo) | +(bin[mnc]! <= rgbLo)) * MASK_LOW
      if (mark) markRun(k, maskCol[x]!, rowEnd, n, mark)
      const col = colOf[x]!
      wl[rowOff[iy]! + col]! += n
      wf[rowOff[ihi]! + col]! += n
      wf[rowOff[ilo]! + col]! += n
      wr[rowC[R]! + col]! += n
      wg[rowC[G]! + col]! += n
      wb[rowC[B]! + col]! += n
    }
  }
  q.len = 0
  k.sumY += sumY; k.yMin = yMin; k.yMax = yMax; k.compMin = compMin; k.compMax = compMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
}


/**
 * edgeEps: half-width of the band around a bin edge inside which the integer bin shortcut is
 * not trusted. The float route rounds twice (y + offset, then ·4 + LV_OFF) for an error under
 * 1e-12 quarter codes; anything this far from an edge lands in the same bin either way. No
 * 8- or 10-bit chroma pair of either matrix comes this close, so the float route is only
 * reached when the tests widen the band to hold it to the reference too.
 */
export const fastTuning = { edgeEps: 1e-9 }

/**
 * Per-code tables for a 4:2:2 Y'CbCr source: every chroma- or luma-only quantity of the
 * reference's arithmetic, evaluated once per code by the reference's own expressions, and
 * per-code counts from which the luma sum, extremes, luma distribution, Cb/Cr histograms
 * and Cb/Cr extremes are folded at the end (each is a function of the code alone, and luma
 * codes are multiples of a quarter, so the folded sum is exact).
 */
class PairTables {
  readonly yCnt: Uint32Array; readonly cbCnt: Uint32Array; readonly crCnt: Uint32Array
  readonly yv: Float64Array; readonly yBin: Int32Array; readonly yOut: Int32Array
  readonly cbV: Float64Array; readonly cbIdx: Int32Array; readonly u: Float64Array; readonly bo: Float64Array; readonly gb: Float64Array
  readonly cbOut: Int32Array; readonly vcT: Int32Array
  readonly crV: Float64Array; readonly crIdx: Int32Array; readonly v: Float64Array; readonly ro: Float64Array; readonly gr: Float64Array
  readonly crOut: Int32Array; readonly vrT: Int32Array
  /** Whole quarter codes R'−Y' (per Cr code) and B'−Y' (per Cb code) move a level, with 1 where that is trusted (binShift). */
  readonly qr: Int32Array; readonly okR: Int32Array; readonly qb: Int32Array; readonly okB: Int32Array
  /** Queue entries pairBatch leaves to the float route. */
  slow = new Int32Array(1024)

  constructor(codes: number, centre: number, span: number, yScale: number, k: Kernel, eps: number) {
    const F = () => new Float64Array(codes); const I = () => new Int32Array(codes)
    this.yCnt = new Uint32Array(codes); this.cbCnt = new Uint32Array(codes); this.crCnt = new Uint32Array(codes)
    this.yv = F(); this.yBin = I(); this.yOut = I()
    this.cbV = F(); this.cbIdx = I(); this.u = F(); this.bo = F(); this.gb = F(); this.cbOut = I(); this.vcT = I()
    this.crV = F(); this.crIdx = I(); this.v = F(); this.ro = F(); this.gr = F(); this.crOut = I(); this.vrT = I()
    this.qr = I(); this.okR = I(); this.qb = I(); this.okB = I()
    const { uK, vK, rK, bK, gR, gB, cbOff, hs } = k
    for (let c = 0; c < codes; c++) {
      const y = c * yScale
      this.yv[c] = y
      this.yBin[c] = (y * LV_SCALE + LV_OFF) | 0
      this.yOut[c] = +(y < LOW_BAND) | +(y >= HIGH_LUMA)
      const p = (c - centre) / span
      const ch = 128 + 224 * p
      const idx = (ch * hs + cbOff) | 0
      const out = +(ch < LOW_BAND) | +(ch >= HIGH_CHROMA)
      this.cbV[c] = ch; this.cbIdx[c] = idx; this.cbOut[c] = out
      this.crV[c] = ch; this.crIdx[c] = idx; this.crOut[c] = out
      const u = uK * p; const v = vK * p
      this.u[c] = u; this.bo[c] = bK * p; this.gb[c] = gB * p
      this.v[c] = v; this.ro[c] = rK * p; this.gr[c] = gR * p
      const vc = Math.floor((u + VECTORSCOPE_EXTENT) * VS_SCALE)
      const vr = Math.floor((VECTORSCOPE_EXTENT - v) * VS_SCALE)
      this.vcT[c] = vc < 0 ? 0 : vc > VS_LAST ? VS_LAST : vc
      this.vrT[c] = vr < 0 ? 0 : vr > VS_LAST ? VS_LAST : vr
      const qr = binShift(this.ro[c]!, eps); const qb = binShift(this.bo[c]!, eps)
      this.qr[c] = qr === qr ? qr : 0; this.okR[c] = +(qr === qr)
      this.qb[c] = qb === qb ? qb : 0; this.okB[c] = +(qb === qb)
    }
  }

  /**
   * The tables for a source's code range and the kernel's coefficients, built once and kept:
   * they are a few hundred kB whose first touch costs page faults on every call otherwise.
   * The engine is synchronous, so one set of counts per key is never in use twice at once.
   */
  static for(codes: number, centre: number, span: number, yScale: number, k: Kernel): PairTables {
    const eps = fastTuning.edgeEps
    const key = [codes, centre, span, yScale, k.uK, k.vK, k.rK, k.bK, k.gR, k.gB, k.cbOff, k.hs, eps].join(',')
    let tb = pairTableCache.get(key)
    if (!tb) {
      tb = new PairTables(codes, centre, span, yScale, k, eps)
      pairTableCache.set(key, tb)
    }
    tb.yCnt.fill(0); tb.cbCnt.fill(0); tb.crCnt.fill(0)
    return tb
  }

  finish(k: Kernel): void {
    const { yCnt, cbCnt, crCnt, yv, yBin, cbV, crV, cbIdx, crIdx } = this
    for (let c = 0; c < yCnt.length; c++) {
      const n = yCnt[c]!
      if (n) {
        const y = yv[c]!
        k.sumY += y * n
        if (y < k.yMin) k.yMin = y
        if (y > k.yMax) k.yMax = y
        k.dl[yBin[c]!]! += n
      }
      const nb = cbCnt[c]!
      if (nb) {
        const cb = cbV[c]!
        if (cb < k.cbMin) k.cbMin = cb
        if (cb > k.cbMax) k.cbMax = cb
        k.cbH[cbIdx[c]!]! += nb
      }
      const nr = crCnt[c]!
      if (nr) {
        const cr = crV[c]!
        if (cr < k.crMin) k.crMin = cr
        if (cr > k.crMax) k.crMax = cr
        k.crH[crIdx[c]!]! += nr
      }
    }
  }
}

const pairTableCache = new Map<string, PairTables>()

/** Whole quarter codes a level moves by when `off` is added, or NaN near a bin edge. */
function binShift(off: number, eps: number): number {
  const z = off * LV_SCALE + 0.5
  const q = Math.floor(z)
  const f = z - q
  return f > eps && f < 1 - eps ? q : NaN
}

/**
 * Measures queued 4:2:2 pairs (a, b = Cb, Cr codes; c, d = Y0, Y1 codes; x = column of Y0)
 * with the reference's arithmetic, looked up per code. The level bin of y + offset is
 * y's bin plus the offset's whole quarter codes, since y is a whole number of quarter codes,
 * unless the offset lies within fastTuning.edgeEps of a bin edge. The offsets are +C and −C
 * (whose shifts are negatives of each other: the same distance from an edge), R'−Y' (per Cr
 * code), B'−Y' (per Cb code) and G'−Y' (from both). A pair with any offset near an edge is
 * set aside and measured by pairFloat, the float route, after the batch.
 */
function pairBatch(k: Kernel, q: Queue, tb: PairTables, rowEnd: number): void {
  const { gamHi, gamLo, wave, rowOff, colOf, maskCol } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo, cbHi, cbLo, crHi, crLo } = k.lim
  const { cbIdx, crIdx } = tb
  const { dhi, dlo, dmx, dmn, dr, dg, db, wl, wf, wr, wg, wb, vec } = k
  const { yCnt, cbCnt, crCnt, yv, yBin, yOut, u: uT, bo: boT, gb: gbT, cbOut, vcT, v: vT, ro: roT, gr: grT, crOut, vrT } = tb
  const { qr: qrT, okR, qb: qbT, okB } = tb
  // Module constants as locals: an imported binding is a cell load with a hole check on
  // every use, which V8 would otherwise repeat per pixel in the loop below.
  const lvScale = LV_SCALE; const compHi = COMP_HI; const compLo = COMP_LO
  const vsSize = VECTORSCOPE_SIZE
  const eps = fastTuning.edgeEps; const eps1 = 1 - eps
  if (tb.slow.length < q.len) tb.slow = new Int32Array(q.len)
  const slow = tb.slow
  let nSlow = 0
  let compMin = k.compMin; let compMax = k.compMax; let cMax = k.cMax
  let compOut = 0; let gamOut = 0; let studOut = 0
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  for (let e = 0, len = q.len; e < len; e++) {
    const cbc = QCb[e]!; const crc = QCr[e]!
    const u = uT[cbc]!; const v = vT[crc]!
    const c = 219 * Math.sqrt(u * u + v * v)
    const go = grT[crc]! + gbT[cbc]!
    const zc = c * lvScale + 0.5; const qhi = Math.floor(zc); const fc = zc - qhi
    const zg = go * lvScale + 0.5; const qg = Math.floor(zg); const fg = zg - qg
    if (!(okR[crc]! & okB[cbc]! & +(fc > eps) & +(fc < eps1) & +(fg > eps) & +(fg < eps1))) {
      slow[nSlow++] = e
      continue
    }
    const n = QN[e]!
    const n2 = 2 * n
    // The chroma sample stands for both pixels of the pair.
    cbCnt[cbc]! += n2
    crCnt[crc]! += n2
    cMax = Math.max(cMax, c)
    const ro = roT[crc]!; const bo = boT[cbc]!
    const cOut = cbOut[cbc]! | crOut[crc]!
    if (wave) vec[vrT[crc]! * vsSize + vcT[cbc]!]! += n2
    const qr = qrT[crc]!; const qb = qbT[cbc]!
    const qmx = max3(qr, qg, qb); const qmn = min3(qr, qg, qb)
    const y0c = QY0[e]!; const y1c = QY1[e]!
    yCnt[y0c]! += n
    yCnt[y1c]! += n
    const y0 = yv[y0c]!; const y1 = yv[y1c]!
    // Rounding is monotone, so the pair's extremes are those of its larger and smaller luma.
    compMax = Math.max(compMax, Math.max(y0, y1) + c); compMin = Math.min(compMin, Math.min(y0, y1) - c)
    const K0 = yBin[y0c]!; const K1 = yBin[y1c]!
    dhi[K0 + qhi]! += n; dhi[K1 + qhi]! += n
    dlo[K0 - qhi]! += n; dlo[K1 - qhi]! += n
    dmx[K0 + qmx]! += n; dmx[K1 + qmx]! += n
    dmn[K0 + qmn]! += n; dmn[K1 + qmn]! += n
    dr[K0 + qr]! += n; dr[K1 + qr]! += n
    dg[K0 + qg]! += n; dg[K1 + qg]! += n
    db[K0 + qb]! += n; db[K1 + qb]! += n
    compOut += (+(y0 + c > compHi) | +(y0 - c < compLo)) * n + (+(y1 + c > compHi) | +(y1 - c < compLo)) * n
    const r0 = y0 + ro; const g0 = y0 + go; const b0 = y0 + bo
    const r1 = y1 + ro; const g1 = y1 + go; const b1 = y1 + bo
    gamOut += (+(r0 > gamHi) | +(g0 > gamHi) | +(b0 > gamHi) | +(r0 < gamLo) | +(g0 < gamLo) | +(b0 < gamLo)) * n
      + (+(r1 > gamHi) | +(g1 > gamHi) | +(b1 > gamHi) | +(r1 < gamLo) | +(g1 < gamLo) | +(b1 < gamLo)) * n
    studOut += (cOut | yOut[y0c]!) * n + (cOut | yOut[y1c]!) * n
    if (wave) {
      const x = QX[e]!
      const ch = +(cbIdx[cbc]! >= cbHi) | +(crIdx[crc]! >= crHi); const cl = +(cbIdx[cbc]! <= cbLo) | +(crIdx[crc]! <= crLo)
      const m0 = (ch | +(K0 >= yHi) | +(K0 + qhi >= cHi) | +(K0 + qmx >= rgbHi)) * MASK_HIGH | (cl | +(K0 <= yLo) | +(K0 - qhi <= cLo) | +(K0 + qmn <= rgbLo)) * MASK_LOW
      const m1 = (ch | +(K1 >= yHi) | +(K1 + qhi >= cHi) | +(K1 + qmx >= rgbHi)) * MASK_HIGH | (cl | +(K1 <= yLo) | +(K1 - qhi <= cLo) | +(K1 + qmn <= rgbLo)) * MASK_LOW
      if (m0 | m1) {
        markRun(k, maskCol[x]!, rowEnd, n, m0)
        markRun(k, maskCol[x + 1]!, rowEnd, n, m1)
      }
      const c0 = colOf[x]!; const c1 = colOf[x + 1]!
      wl[rowOff[K0]! + c0]! += n; wl[rowOff[K1]! + c1]! += n
      wf[rowOff[K0 + qhi]! + c0]! += n; wf[rowOff[K1 + qhi]! + c1]! += n
      wf[rowOff[K0 - qhi]! + c0]! += n; wf[rowOff[K1 - qhi]! + c1]! += n
      wr[rowOff[K0 + qr]! + c0]! += n; wr[rowOff[K1 + qr]! + c1]! += n
      wg[rowOff[K0 + qg]! + c0]! += n; wg[rowOff[K1 + qg]! + c1]! += n
      wb[rowOff[K0 + qb]! + c0]! += n; wb[rowOff[K1 + qb]! + c1]! += n
    }
  }
  k.compMin = compMin; k.compMax = compMax; k.cMax = cMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
  if (nSlow) pairFloat(k, q, tb, nSlow, rowEnd)
  q.len = 0
}

/** The pairs pairBatch set aside, measured by the float route: every level binned from its value. */
function pairFloat(k: Kernel, q: Queue, tb: PairTables, nSlow: number, rowEnd: number): void {
  const { gamHi, gamLo, wave, rowOff, colOf, maskCol } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo, cbHi, cbLo, crHi, crLo } = k.lim
  const { cbIdx, crIdx } = tb
  const { dhi, dlo, dmx, dmn, dr, dg, db, wl, wf, wr, wg, wb, vec } = k
  const { yCnt, cbCnt, crCnt, yv, yBin, yOut, u: uT, bo: boT, gb: gbT, cbOut, vcT, v: vT, ro: roT, gr: grT, crOut, vrT, slow } = tb
  const lvScale = LV_SCALE; const lvOff = LV_OFF; const compHi = COMP_HI; const compLo = COMP_LO
  let compMin = k.compMin; let compMax = k.compMax; let cMax = k.cMax
  let compOut = 0; let gamOut = 0; let studOut = 0
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  for (let j = 0; j < nSlow; j++) {
    const e = slow[j]!
    const n = QN[e]!
    const cbc = QCb[e]!; const crc = QCr[e]!
    cbCnt[cbc]! += 2 * n
    crCnt[crc]! += 2 * n
    const u = uT[cbc]!; const v = vT[crc]!
    const c = 219 * Math.sqrt(u * u + v * v)
    cMax = Math.max(cMax, c)
    const ro = roT[crc]!; const bo = boT[cbc]!; const go = grT[crc]! + gbT[cbc]!
    const cOut = cbOut[cbc]! | crOut[crc]!
    if (wave) vec[vrT[crc]! * VECTORSCOPE_SIZE + vcT[cbc]!]! += 2 * n
    for (let h = 0; h < 2; h++) {
      const yc = h ? QY1[e]! : QY0[e]!
      yCnt[yc]! += n
      const y = yv[yc]!
      const hi = y + c; const lo = y - c
      compMax = Math.max(compMax, hi); compMin = Math.min(compMin, lo)
      const yr = y + ro; const yg = y + go; const yb = y + bo
      const ihi = (hi * lvScale + lvOff) | 0
      const ilo = (lo * lvScale + lvOff) | 0
      const ir = (yr * lvScale + lvOff) | 0
      const ig = (yg * lvScale + lvOff) | 0
      const ib = (yb * lvScale + lvOff) | 0
      dhi[ihi]! += n
      dlo[ilo]! += n
      const imx = max3(ir, ig, ib); const imn = min3(ir, ig, ib)
      dmx[imx]! += n
      dmn[imn]! += n
      dr[ir]! += n
      dg[ig]! += n
      db[ib]! += n
      compOut += (+(hi > compHi) | +(lo < compLo)) * n
      gamOut += (+(yr > gamHi) | +(yg > gamHi) | +(yb > gamHi) | +(yr < gamLo) | +(yg < gamLo) | +(yb < gamLo)) * n
      studOut += (cOut | yOut[yc]!) * n
      if (wave) {
        const iy = yBin[yc]!; const cbi = cbIdx[cbc]!; const cri = crIdx[crc]!
        const mark = (+(iy >= yHi) | +(ihi >= cHi) | +(imx >= rgbHi) | +(cbi >= cbHi) | +(cri >= crHi)) * MASK_HIGH
          | (+(iy <= yLo) | +(ilo <= cLo) | +(imn <= rgbLo) | +(cbi <= cbLo) | +(cri <= crLo)) * MASK_LOW
        if (mark) markRun(k, maskCol[QX[e]! + h]!, rowEnd, n, mark)
        const col = colOf[QX[e]! + h]!
        wl[rowOff[yBin[yc]!]! + col]! += n
        wf[rowOff[ihi]! + col]! += n
        wf[rowOff[ilo]! + col]! += n
        wr[rowOff[ir]! + col]! += n
        wg[rowOff[ig]! + col]! += n
        wb[rowOff[ib]! + col]! += n
      }
    }
  }
  k.compMin = compMin; k.compMax = compMax; k.cMax = cMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
}

/** R'−G' and B'−G' codes run −255…255: the key of a pixel's difference pair. */
const DIFFS = 511
const KEY_BASE = 255 * DIFFS + 255

/**
 * Chroma of 8-bit R'G'B' per pair of code differences (R'−G', B'−G'): Y'−G', Pb and Pr
 * depend on those alone (decode.ts), so C, Cb, Cr and the vectorscope cell are computed
 * once per pair by the reference's expressions, and pixels are counted per pair; fold()
 * turns the counts into the Cb/Cr histograms, their extremes, the largest C and the
 * vectorscope. Built once per scale and matrix (≈ 7 MB, a few ms) and kept.
 */
class RgbChroma {
  /** [2·key] = Y'−G' on the 0…1 scale, [2·key + 1] = C in codes. */
  readonly tc = new Float64Array(2 * DIFFS * DIFFS)
  readonly cbi = new Int16Array(DIFFS * DIFFS)
  readonly cri = new Int16Array(DIFFS * DIFFS)
  /** 1 where Cb or Cr lies outside the studio range. */
  readonly cOut = new Uint8Array(DIFFS * DIFFS)
  readonly cnt = new Uint32Array(DIFFS * DIFFS)
  private bitsKey = ''
  private bits = new Uint8Array(0)

  constructor(readonly scale: number, readonly matrix: MatrixName, readonly k: Kernel) {
    const { kr, kb, cbDiv, crDiv } = MATRICES[matrix]
    const { uK, vK, cbOff, hs } = k
    for (let dR = -255; dR <= 255; dR++) {
      for (let dB = -255; dB <= 255; dB++) {
        const key = (dR + 255) * DIFFS + dB + 255
        const { t, pb, pr } = RgbChroma.diffs(dR, dB, scale, kr, kb, cbDiv, crDiv)
        const u = uK * pb; const v = vK * pr
        const cb = 128 + 224 * pb
        const cr = 128 + 224 * pr
        this.tc[2 * key] = t
        this.tc[2 * key + 1] = 219 * Math.sqrt(u * u + v * v)
        this.cbi[key] = (cb * hs + cbOff) | 0
        this.cri[key] = (cr * hs + cbOff) | 0
        this.cOut[key] = +(cb < LOW_BAND) | +(cb >= HIGH_CHROMA) | +(cr < LOW_BAND) | +(cr >= HIGH_CHROMA)
      }
    }
  }

  /** decode.ts's expressions for one difference pair. */
  static diffs(dR: number, dB: number, scale: number, kr: number, kb: number, cbDiv: number, crDiv: number): { t: number, pb: number, pr: number } {
    const dr = dR * scale
    const db = dB * scale
    const t = kr * dr + kb * db
    return { t, pb: (db - t) / cbDiv, pr: (dr - t) / crDiv }
  }

  static for(scale: number, matrix: MatrixName, k: Kernel): RgbChroma {
    const key = [scale, matrix, k.uK, k.vK, k.cbOff, k.hs].join(',')
    let ch = rgbChromaCache.get(key)
    if (!ch) {
      ch = new RgbChroma(scale, matrix, k)
      rgbChromaCache.set(key, ch)
    }
    ch.cnt.fill(0)
    return ch
  }

  /** Per pair: bit 0 Cb/Cr outside the studio range, bits 1 and 2 beyond the mask's Cb/Cr limits. */
  bitsFor(lim: MaskLimits): Uint8Array {
    const key = [lim.cbHi, lim.cbLo, lim.crHi, lim.crLo].join(',')
    if (key !== this.bitsKey) {
      const { cbi, cri, cOut } = this
      const bits = new Uint8Array(cOut.length)
      for (let i = 0; i < bits.length; i++) {
        bits[i] = cOut[i]! | ((+(cbi[i]! >= lim.cbHi) | +(cri[i]! >= lim.crHi)) << 1) | ((+(cbi[i]! <= lim.cbLo) | +(cri[i]! <= lim.crLo)) << 2)
      }
      this.bits = bits
      this.bitsKey = key
    }
    return this.bits
  }

  fold(k: Kernel): void {
    const { kr, kb, cbDiv, crDiv } = MATRICES[this.matrix]
    const { cnt, tc, cbi, cri } = this
    const { uK, vK, wave, cbH, crH, vec } = k
    for (let dR = -255; dR <= 255; dR++) {
      for (let dB = -255; dB <= 255; dB++) {
        const key = (dR + 255) * DIFFS + dB + 255
        const n = cnt[key]!
        if (!n) continue
        cbH[cbi[key]!]! += n
        crH[cri[key]!]! += n
        k.cMax = Math.max(k.cMax, tc[2 * key + 1]!)
        const { pb, pr } = RgbChroma.diffs(dR, dB, this.scale, kr, kb, cbDiv, crDiv)
        const cb = 128 + 224 * pb
        const cr = 128 + 224 * pr
        k.cbMin = Math.min(k.cbMin, cb); k.cbMax = Math.max(k.cbMax, cb)
        k.crMin = Math.min(k.crMin, cr); k.crMax = Math.max(k.crMax, cr)
        if (wave) {
          const u = uK * pb; const v = vK * pr
          let vc = Math.floor((u + VECTORSCOPE_EXTENT) * VS_SCALE)
          let vr = Math.floor((VECTORSCOPE_EXTENT - v) * VS_SCALE)
          vc = vc < 0 ? 0 : vc > VS_LAST ? VS_LAST : vc
          vr = vr < 0 ? 0 : vr > VS_LAST ? VS_LAST : vr
          vec[vr * VECTORSCOPE_SIZE + vc]! += n
        }
      }
    }
  }
}

const rgbChromaCache = new Map<string, RgbChroma>()

/**
 * Per-code tables for 8-bit R'G'B': each channel's value as decode.ts reads it (code · scale +
 * offset, the same double), the level bin of that channel's R'/G'/B' level, whether that
 * level lies outside the gamut limits, and per-code counts. The bin of the reference's
 * y + ro (ro = rK·pr) is the bin of 16 + 219·R' because the two differ by rounding alone
 * (about 1e-13) while every 8-bit level sits at least 1/255 of a bin from a bin edge and an
 * eighth of a code from the gamut limits; tests/unit/engine/fast.test.ts checks this for
 * every one of the 2^24 triples, both matrices and both ranges.
 */
class RgbTables {
  readonly S = new Float64Array(256)
  readonly bin = new Int32Array(256)
  readonly out = new Int32Array(256)
  readonly cR = new Uint32Array(256); readonly cG = new Uint32Array(256); readonly cB = new Uint32Array(256)
  readonly cMx = new Uint32Array(256); readonly cMn = new Uint32Array(256)
  constructor(scale: number, offset: number, gamHi: number, gamLo: number) {
    for (let c = 0; c < 256; c++) {
      const v = c * scale + offset
      const level = 16 + 219 * v
      this.S[c] = v
      this.bin[c] = (level * LV_SCALE + LV_OFF) | 0
      this.out[c] = +(level > gamHi) | +(level < gamLo)
    }
  }

  static for(scale: number, offset: number, k: Kernel): RgbTables {
    const key = [scale, offset, k.gamHi, k.gamLo].join(',')
    let tb = rgbTableCache.get(key)
    if (!tb) {
      tb = new RgbTables(scale, offset, k.gamHi, k.gamLo)
      rgbTableCache.set(key, tb)
    }
    tb.cR.fill(0); tb.cG.fill(0); tb.cB.fill(0); tb.cMx.fill(0); tb.cMn.fill(0)
    return tb
  }

  finish(k: Kernel): void {
    const { bin, cR, cG, cB, cMx, cMn } = this
    for (let c = 0; c < 256; c++) {
      const b = bin[c]!
      k.dr[b]! += cR[c]!; k.dg[b]! += cG[c]!; k.db[b]! += cB[c]!; k.dmx[b]! += cMx[c]!; k.dmn[b]! += cMn[c]!
    }
  }
}

const rgbTableCache = new Map<string, RgbTables>()

/**
 * Rows r0..r1−1 of one stripe of 8-bit R'G'B', every pixel measured on its own: the route for
 * grain, where vertical runs are short and tracking them costs more than it saves. Returns
 * how many pixels repeated the pixel above (keys holds the last row's pixels), so the caller
 * can go back to folding runs when they come. No test in the loop is skipped for input that
 * cannot fail it: a loop-invariant branch around them cost V8 more than the tests themselves.
 */
function rgbRows(k: Kernel, tb: RgbTables, ch: RgbChroma, bT: Uint8Array, data: Uint8Array, width: number, chans: number, x0: number, n: number,
  r0: number, r1: number, keys: Int32Array, rowC: Int32Array): number {
  const { wave, rowOff, colOf, mask, maskCol, maskRow } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo } = k.lim
  const { dl, dhi, dlo, wl, wf, wr, wg, wb } = k
  const { S, bin, out: gOut, cR, cG, cB, cMx, cMn } = tb
  const { tc, cnt } = ch
  // Module constants as locals: an imported binding is a cell load with a hole check on
  // every use, which V8 would otherwise repeat per pixel in the loop below.
  const lvScale = LV_SCALE; const lvOff = LV_OFF; const compHi = COMP_HI; const compLo = COMP_LO
  const lowBand = LOW_BAND; const highLuma = HIGH_LUMA; const keyBase = KEY_BASE
  let sumY = 0; let yMin = k.yMin; let yMax = k.yMax; let compMin = k.compMin; let compMax = k.compMax
  let compOut = 0; let gamOut = 0; let studOut = 0; let reps = 0
  for (let row = r0; row < r1; row++) {
    let i = (row * width + x0) * chans
    const mRow = wave ? maskRow[row]! : 0
    for (let p = 0; p < n; p++, i += chans) {
      const R = data[i]!; const G = data[i + 1]!; const B = data[i + 2]!
      const px = R | (G << 8) | (B << 16)
      reps += +(px === keys[p]!)
      keys[p] = px
      // Chroma depends on the code differences alone (decode.ts): looked up, and counted per
      // difference pair for the Cb/Cr histograms, extremes and vectorscope (RgbChroma.fold).
      const key = R * 511 - G * 512 + B + keyBase
      const t = tc[2 * key]!; const c = tc[2 * key + 1]!
      const bits = bT[key]!
      cnt[key]!++
      const y = 16 + 219 * (S[G]! + t)
      sumY += y
      yMin = Math.min(yMin, y); yMax = Math.max(yMax, y)
      const hi = y + c; const lo = y - c
      compMax = Math.max(compMax, hi); compMin = Math.min(compMin, lo)
      const iy = (y * lvScale + lvOff) | 0
      const ihi = (hi * lvScale + lvOff) | 0
      const ilo = (lo * lvScale + lvOff) | 0
      dl[iy]!++
      dhi[ihi]!++
      dlo[ilo]!++
      cR[R]!++
      cG[G]!++
      cB[B]!++
      const mxc = max3(R, G, B); const mnc = min3(R, G, B)
      cMx[mxc]!++
      cMn[mnc]!++
      compOut += +(hi > compHi) | +(lo < compLo)
      gamOut += gOut[R]! | gOut[G]! | gOut[B]!
      studOut += (bits & 1) | +(y < lowBand) | +(y >= highLuma)
      if (wave) {
        mask[mRow + maskCol[x0 + p]!]! |= (((bits >> 1) & 1) | +(iy >= yHi) | +(ihi >= cHi) | +(bin[mxc]! >= rgbHi)) * MASK_HIGH
          | ((bits >> 2) | +(iy <= yLo) | +(ilo <= cLo) | +(bin[mnc]! <= rgbLo)) * MASK_LOW
        const col = colOf[x0 + p]!
        wl[rowOff[iy]! + col]!++
        wf[rowOff[ihi]! + col]!++
        wf[rowOff[ilo]! + col]!++
        wr[rowC[R]! + col]!++
        wg[rowC[G]! + col]!++
        wb[rowC[B]! + col]!++
      }
    }
  }
  k.sumY += sumY; k.yMin = yMin; k.yMax = yMax; k.compMin = compMin; k.compMax = compMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
  return reps
}


/** Which route the 8-bit R'G'B' kernel takes: chosen per stripe as it goes (auto), or one only (for the tests). */
export const fastMode = { rgb: 'auto' as 'auto' | 'direct' | 'runs', chroma: 'auto' as 'auto' | 'table' | 'math' }

/**
 * Whether a picture's colour changes little from one pixel to the next, judged on up to 4096
 * pairs of neighbours spread over the frame: then the per-pair chroma tables are read
 * within a small patch at a time and beat computing chroma per pixel; with colour noise
 * every read lands somewhere new in 7 MB of tables and computing wins (measured: about
 * 1.6 × faster on grain, 2 × slower on uniform noise).
 */
function chromaCoherent(data: Uint8Array, width: number, height: number, chans: number): boolean {
  if (width < 2) return true
  const rows = Math.min(height, 64); const cols = Math.min(width - 1, 64)
  let sum = 0
  for (let a = 0; a < rows; a++) {
    const row = Math.floor((a + 0.5) * height / rows)
    for (let b = 0; b < cols; b++) {
      const i = (row * width + Math.floor((b + 0.5) * (width - 1) / cols)) * chans
      const j = i + chans
      sum += Math.abs((data[i]! - data[i + 1]!) - (data[j]! - data[j + 1]!)) + Math.abs((data[i + 2]! - data[i + 1]!) - (data[j + 2]! - data[j + 1]!))
    }
  }
  return sum <= CHROMA_STEP_LIMIT * rows * cols
}

/** Mean change of R'−G' plus B'−G' between neighbours (codes) up to which chroma is looked up. */
const CHROMA_STEP_LIMIT = 24

function rgb8(data: Uint8Array, width: number, height: number, chans: number, full: boolean, matrix: MatrixName, k: Kernel, stripe: number): { tb: RgbTables, ch: RgbChroma } {
  // As decode.ts derives them, so every product is the reference's to the bit.
  const scale = full ? 1 / 255 : 1 / 219
  const offset = full ? 0 : -16 / 219
  const tb = RgbTables.for(scale, offset, k)
  const ch = RgbChroma.for(scale, matrix, k)
  const bT = ch.bitsFor(k.lim)
  const table = fastMode.chroma === 'table' || (fastMode.chroma === 'auto' && chromaCoherent(data, width, height, chans))
  const { kr, kb, cbDiv, crDiv } = MATRICES[matrix]
  const rowC = new Int32Array(256)
  if (k.wave) for (let c = 0; c < 256; c++) rowC[c] = k.rowOff[tb.bin[c]!]!
  const keys = new Int32Array(stripe)
  const runs = new Int32Array(stripe)
  const q = new Queue(stripe)
  const { x: QX, a: QR, b: QG, c: QB, n: QN } = q
  const queueRun = (m: number, p: number, x0: number): number => {
    const old = keys[p]!
    QX[m] = x0 + p; QR[m] = old & 255; QG[m] = (old >>> 8) & 255; QB[m] = old >>> 16; QN[m] = runs[p]!
    return m + 1
  }
  // Whole rows of a stripe are compared a 32-bit word at a time where the bytes allow it: a
  // row the same as the one above (bars, graphics, letterbox) then costs a quarter of the
  // per-pixel comparison, and its rows are added to every open run at once.
  const words = data.byteOffset % 4 === 0 && (width * chans) % 4 === 0 && (stripe * chans) % 4 === 0
    ? new Int32Array(data.buffer, data.byteOffset, data.length >> 2) : undefined
  const sameAsAbove = (row: number, x0: number, n: number): boolean => {
    const nb = n * chans
    const at = (row * width + x0) * chans
    const above = at - width * chans
    if (words && nb % 4 === 0) {
      for (let j = at >> 2, k2 = above >> 2, end = (at + nb) >> 2; j < end; j++, k2++) if (words[j] !== words[k2]) return false
      return true
    }
    for (let j = 0; j < nb; j++) if (data[at + j] !== data[above + j]) return false
    return true
  }
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const n = Math.min(stripe, width - x0)
    runs.fill(0)
    keys.fill(-1)
    let direct = fastMode.rgb === 'direct'
    let busy = 0
    let row = 0
    // Rows that repeated the one above, not yet added to the runs; open: every pixel has a run.
    let pending = 0
    let open = false
    const settle = () => {
      if (pending) for (let p = 0; p < n; p++) runs[p] = runs[p]! + pending
      pending = 0
    }
    while (row < height) {
      if (direct) {
        const r1 = Math.min(height, row + DIRECT_BLOCK)
        const reps = table
          ? rgbRows(k, tb, ch, bT, data, width, chans, x0, n, row, r1, keys, rowC)
          : rgbRowsMath(k, tb, data, width, chans, x0, n, row, r1, keys, scale, kr, kb, cbDiv, crDiv, rowC)
        // Back to folding runs once most pixels repeat the one above (a graphic, a letterbox).
        if (fastMode.rgb === 'auto' && 2 * reps > (r1 - row) * n) {
          direct = false
          busy = 0
          runs.fill(0)
          open = false
        }
        row = r1
        continue
      }
      if (open && sameAsAbove(row, x0, n)) {
        pending++
        busy = 0
        row++
        continue
      }
      settle()
      open = true
      let m = 0
      let i = (row * width + x0) * chans
      for (let p = 0; p < n; p++, i += chans) {
        const key = data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16)
        const run = runs[p]!
        if (key === keys[p] && run) {
          runs[p] = run + 1
          continue
        }
        if (run) m = queueRun(m, p, x0)
        keys[p] = key
        runs[p] = 1
      }
      q.len = m
      if (m) rgbBatch(k, q, tb, ch, bT, rowC, row)
      row++
      // Grain: when most runs end after a row or two, per-pixel measurement is cheaper.
      busy = 2 * m > n ? busy + 1 : 0
      if (busy >= 2 && fastMode.rgb !== 'runs') {
        m = 0
        for (let p = 0; p < n; p++) if (runs[p]) m = queueRun(m, p, x0)
        q.len = m
        if (m) rgbBatch(k, q, tb, ch, bT, rowC, row)
        direct = true
      }
    }
    if (!direct) {
      // Past the last row: every run still open ends.
      settle()
      let m = 0
      for (let p = 0; p < n; p++) if (runs[p]) m = queueRun(m, p, x0)
      q.len = m
      if (m) rgbBatch(k, q, tb, ch, bT, rowC, height)
    }
  }
  return { tb, ch }
}

/**
 * rgbRows with chroma computed per pixel instead of looked up: the route for pictures whose
 * colour jumps from pixel to pixel (colour noise), where the per-pair tables of RgbChroma
 * would be read all over their 7 MB and every read would miss the cache. Same arithmetic,
 * same results (fast.test.ts runs both).
 */
function rgbRowsMath(k: Kernel, tb: RgbTables, data: Uint8Array, width: number, ch: number, x0: number, n: number, r0: number, r1: number,
  keys: Int32Array, scale: number, kr: number, kb: number, cbDiv: number, crDiv: number, rowC: Int32Array): number {
  const { uK, vK, cbOff, hs, wave, rowOff, colOf, mask, maskCol, maskRow } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo, cbHi, cbLo, crHi, crLo } = k.lim
  const bin = tb.bin
  const { dl, dhi, dlo, cbH, crH, wl, wf, wr, wg, wb, vec } = k
  const { S, out: gOut, cR, cG, cB, cMx, cMn } = tb
  // Module constants as locals: an imported binding is a cell load with a hole check on
  // every use, which V8 would otherwise repeat per pixel in the loop below.
  const lvScale = LV_SCALE; const lvOff = LV_OFF; const compHi = COMP_HI; const compLo = COMP_LO
  const lowBand = LOW_BAND; const highChroma = HIGH_CHROMA; const highLuma = HIGH_LUMA
  const vsExt = VECTORSCOPE_EXTENT; const vsScale = VS_SCALE; const vsLast = VS_LAST
  const vsSize = VECTORSCOPE_SIZE
  let sumY = 0; let yMin = k.yMin; let yMax = k.yMax; let compMin = k.compMin; let compMax = k.compMax
  let cbMin = k.cbMin; let cbMax = k.cbMax; let crMin = k.crMin; let crMax = k.crMax; let cMax = k.cMax
  let compOut = 0; let gamOut = 0; let studOut = 0; let reps = 0
  for (let row = r0; row < r1; row++) {
    let i = (row * width + x0) * ch
    const mRow = wave ? maskRow[row]! : 0
    for (let p = 0; p < n; p++, i += ch) {
      const R = data[i]!; const G = data[i + 1]!; const B = data[i + 2]!
      const key = R | (G << 8) | (B << 16)
      reps += +(key === keys[p]!)
      keys[p] = key
      // decode.ts's expressions, computed here rather than looked up (see rgb8).
      const dr = (R - G) * scale; const db = (B - G) * scale
      const t = kr * dr + kb * db
      const y = 16 + 219 * (S[G]! + t)
      const pb = (db - t) / cbDiv
      const pr = (dr - t) / crDiv
      const cb = 128 + 224 * pb
      const cr = 128 + 224 * pr
      cbMin = Math.min(cbMin, cb); cbMax = Math.max(cbMax, cb)
      crMin = Math.min(crMin, cr); crMax = Math.max(crMax, cr)
      const cbi = (cb * hs + cbOff) | 0
      const cri = (cr * hs + cbOff) | 0
      cbH[cbi]!++
      crH[cri]!++
      const u = uK * pb; const v = vK * pr
      const c = 219 * Math.sqrt(u * u + v * v)
      cMax = Math.max(cMax, c)
      sumY += y
      yMin = Math.min(yMin, y); yMax = Math.max(yMax, y)
      const hi = y + c; const lo = y - c
      compMax = Math.max(compMax, hi); compMin = Math.min(compMin, lo)
      const iy = (y * lvScale + lvOff) | 0
      const ihi = (hi * lvScale + lvOff) | 0
      const ilo = (lo * lvScale + lvOff) | 0
      dl[iy]!++
      dhi[ihi]!++
      dlo[ilo]!++
      cR[R]!++
      cG[G]!++
      cB[B]!++
      const mxc = max3(R, G, B); const mnc = min3(R, G, B)
      cMx[mxc]!++
      cMn[mnc]!++
      compOut += +(hi > compHi) | +(lo < compLo)
      gamOut += gOut[R]! | gOut[G]! | gOut[B]!
      studOut += +(cb < lowBand) | +(cb >= highChroma) | +(cr < lowBand) | +(cr >= highChroma) | +(y < lowBand) | +(y >= highLuma)
      if (wave) {
        let vc = ((u + vsExt) * vsScale) | 0
        let vr = ((vsExt - v) * vsScale) | 0
        vc = vc < 0 ? 0 : vc > vsLast ? vsLast : vc
        vr = vr < 0 ? 0 : vr > vsLast ? vsLast : vr
        vec[vr * vsSize + vc]!++
        mask[mRow + maskCol[x0 + p]!]! |= (+(iy >= yHi) | +(ihi >= cHi) | +(bin[mxc]! >= rgbHi) | +(cbi >= cbHi) | +(cri >= crHi)) * MASK_HIGH
          | (+(iy <= yLo) | +(ilo <= cLo) | +(bin[mnc]! <= rgbLo) | +(cbi <= cbLo) | +(cri <= crLo)) * MASK_LOW
        const col = colOf[x0 + p]!
        wl[rowOff[iy]! + col]!++
        wf[rowOff[ihi]! + col]!++
        wf[rowOff[ilo]! + col]!++
        wr[rowC[R]! + col]!++
        wg[rowC[G]! + col]!++
        wb[rowC[B]! + col]!++
      }
    }
  }
  k.sumY += sumY; k.yMin = yMin; k.yMax = yMax; k.compMin = compMin; k.compMax = compMax
  k.cbMin = cbMin; k.cbMax = cbMax; k.crMin = crMin; k.crMax = crMax; k.cMax = cMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
  return reps
}


/** Rows measured per call of the per-pixel route before the repeat count is looked at. */
const DIRECT_BLOCK = 8

function uyvy(data: Uint8Array, width: number, height: number, k: Kernel, stripe: number): PairTables {
  const tb = PairTables.for(256, 128, 224, 1, k)
  const pairs = stripe >> 1
  const keys = new Int32Array(pairs)
  const runs = new Int32Array(pairs)
  const q = new Queue(pairs)
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const np = Math.min(stripe, width - x0) >> 1
    runs.fill(0)
    for (let row = 0; row <= height; row++) {
      let m = 0
      const last = row === height
      let i = (row * width + x0) * 2
      for (let j = 0; j < np; j++, i += 4) {
        const run = runs[j]!
        if (!last) {
          const key = data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16) | (data[i + 3]! << 24)
          if (key === keys[j] && run) {
            runs[j] = run + 1
            continue
          }
          if (run) {
            const old = keys[j]!
            QX[m] = x0 + 2 * j; QCb[m] = old & 255; QY0[m] = (old >>> 8) & 255; QCr[m] = (old >>> 16) & 255; QY1[m] = old >>> 24; QN[m++] = run
          }
          keys[j] = key
          runs[j] = 1
        }
        else {
          const old = keys[j]!
          QX[m] = x0 + 2 * j; QCb[m] = old & 255; QY0[m] = (old >>> 8) & 255; QCr[m] = (old >>> 16) & 255; QY1[m] = old >>> 24; QN[m++] = run
        }
      }
      q.len = m
      if (m) pairBatch(k, q, tb, row)
    }
  }
  return tb
}

function v210(data: Uint8Array, width: number, height: number, k: Kernel, stripe: number): PairTables {
  const tb = PairTables.for(1024, 512, 896, 0.25, k)
  const stride = v210Stride(width)
  // Rows start on 128-byte boundaries, so an aligned buffer can be read a word at a time.
  const words = LITTLE_ENDIAN && data.byteOffset % 4 === 0 ? new Int32Array(data.buffer, data.byteOffset, data.length >> 2) : undefined
  const groups = stripe / 6
  const keys = new Int32Array(groups * 4)
  const runs = new Int32Array(groups)
  const q = new Queue(stripe >> 1)
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const n = Math.min(stripe, width - x0)
    const ng = Math.ceil(n / 6)
    runs.fill(0)
    for (let row = 0; row <= height; row++) {
      let m = 0
      const last = row === height
      let i = row * stride + (x0 / 6) * 16
      for (let g = 0; g < ng; g++, i += 16) {
        const ko = g * 4
        const run = runs[g]!
        if (!last) {
          let w0: number, w1: number, w2: number, w3: number
          if (words) {
            const j = i >> 2
            w0 = words[j]!; w1 = words[j + 1]!; w2 = words[j + 2]!; w3 = words[j + 3]!
          }
          else {
            w0 = data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16) | (data[i + 3]! << 24)
            w1 = data[i + 4]! | (data[i + 5]! << 8) | (data[i + 6]! << 16) | (data[i + 7]! << 24)
            w2 = data[i + 8]! | (data[i + 9]! << 8) | (data[i + 10]! << 16) | (data[i + 11]! << 24)
            w3 = data[i + 12]! | (data[i + 13]! << 8) | (data[i + 14]! << 16) | (data[i + 15]! << 24)
          }
          if (run && w0 === keys[ko] && w1 === keys[ko + 1] && w2 === keys[ko + 2] && w3 === keys[ko + 3]) {
            runs[g] = run + 1
            continue
          }
          if (run) m = queueGroup(q, m, keys, ko, x0 + g * 6, width, run)
          keys[ko] = w0; keys[ko + 1] = w1; keys[ko + 2] = w2; keys[ko + 3] = w3
          runs[g] = 1
        }
        else {
          m = queueGroup(q, m, keys, ko, x0 + g * 6, width, run)
        }
      }
      q.len = m
      if (m) pairBatch(k, q, tb, row)
    }
  }
  return tb
}

/**
 * Queues the pairs of one v210 group: word order Cb0 Y0 Cr0 | Y1 Cb1 Y2 | Cr1 Y3 Cb2 | Y4 Cr2 Y5
 * (decode.ts); a group at the right edge may hold only two or four pixels of the picture.
 */
function queueGroup(q: Queue, m: number, keys: Int32Array, ko: number, x: number, width: number, run: number): number {
  const w0 = keys[ko]!; const w1 = keys[ko + 1]!; const w2 = keys[ko + 2]!; const w3 = keys[ko + 3]!
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  QX[m] = x; QCb[m] = w0 & 1023; QY0[m] = (w0 >>> 10) & 1023; QCr[m] = (w0 >>> 20) & 1023; QY1[m] = w1 & 1023; QN[m++] = run
  if (x + 2 < width) {
    QX[m] = x + 2; QCb[m] = (w1 >>> 10) & 1023; QY0[m] = (w1 >>> 20) & 1023; QCr[m] = w2 & 1023; QY1[m] = (w2 >>> 10) & 1023; QN[m++] = run
  }
  if (x + 4 < width) {
    QX[m] = x + 4; QCb[m] = (w2 >>> 20) & 1023; QY0[m] = w3 & 1023; QCr[m] = (w3 >>> 10) & 1023; QY1[m] = (w3 >>> 20) & 1023; QN[m++] = run
  }
  return m
}
