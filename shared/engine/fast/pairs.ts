// 4:2:2 Y'CbCr measured a pair of pixels (one chroma sample) at a time from per-code tables;
// shared by the UYVY and v210 kernels, which queue pairs in the same form.
import { COMP_HI, COMP_LO, HIGH_CHROMA, HIGH_LUMA, LOW_BAND, LV_OFF, LV_SCALE, VS_LAST, VS_SCALE } from '../accumulate'
import { VECTORSCOPE_EXTENT, VECTORSCOPE_SIZE } from '../vectorscope'
import { MASK_HIGH, MASK_LOW } from '../mask'
import type { Kernel, Queue } from './kernel';
import { markRun, max3, min3 } from './kernel'

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
export class PairTables {
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
export function pairBatch(k: Kernel, q: Queue, tb: PairTables, rowEnd: number): void {
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
    if (c > cMax) cMax = c
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
    const dy = y0c - y1c; const sy = dy & (dy >> 31)
    const yh = yv[y0c - sy]!; const yl = yv[y1c + sy]!
    if (yh + c > compMax) compMax = yh + c
    if (yl - c < compMin) compMin = yl - c
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
