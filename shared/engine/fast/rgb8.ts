// 8-bit R'G'B' (3 or 4 channels, full or studio range): vertical runs folded while pixels
// repeat the one above, per-pixel measurement on grain, chroma looked up per pair of code
// differences on coherent pictures and computed on colour noise (see index.ts).
import { COMP_HI, COMP_LO, HIGH_CHROMA, HIGH_LUMA, LOW_BAND, LV_OFF, LV_SCALE, VS_LAST, VS_SCALE } from '../accumulate'
import { MATRICES } from '../matrix'
import { VECTORSCOPE_EXTENT, VECTORSCOPE_SIZE } from '../vectorscope'
import type { MatrixName } from '../types'
import { MASK_HIGH, MASK_LOW } from '../mask'
import type { MaskLimits } from '../mask'
import type { Kernel} from './kernel';
import { markRun, max3, min3, Queue } from './kernel'

/**
 * Measures queued R'G'B' pixels (a, b, c = R, G, B codes; n = run length) with the
 * reference's arithmetic: luma and the R'/G'/B' levels per pixel, chroma looked up by the
 * pair of code differences (RgbChroma) and counted per pair.
 */
function rgbBatch(k: Kernel, q: Queue, tb: RgbTables, ch: RgbChroma, bT: Uint8Array, rowEnd: number): void {
  const { wave, rowOff, colOf, maskCol } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo } = k.lim
  const { dl, dhi, dlo, wl, wf, wr, wg, wb } = k
  const { S, bin, out: gOut, cR, cG, cB, cMx, cMn, rowC } = tb
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
    if (y < yMin) yMin = y
    if (y > yMax) yMax = y
    const hi = y + c; const lo = y - c
    if (hi > compMax) compMax = hi
    if (lo < compMin) compMin = lo
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
export class RgbChroma {
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
export class RgbTables {
  readonly S = new Float64Array(256)
  readonly bin = new Int32Array(256)
  readonly out = new Int32Array(256)
  readonly cR = new Uint32Array(256); readonly cG = new Uint32Array(256); readonly cB = new Uint32Array(256)
  readonly cMx = new Uint32Array(256); readonly cMn = new Uint32Array(256)
  /**
   * With densities, for the stripe in hand when it is measured pixel by pixel: per waveform
   * column, the count of each R', G' and B' code ([col·768 + code], [+ 256 + code],
   * [+ 512 + code], col from the stripe's first). The R'G'B' waveform densities and the
   * per-code counts are both folded from them when the stripe is done (foldStripe): one
   * increment per channel and pixel instead of two. Zero between stripes.
   */
  cols = new Uint32Array(0)
  /** Density row offset of each code's R'/G'/B' level, for the frame in hand. */
  readonly rowC = new Int32Array(256)
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
    if (k.wave) for (let c = 0; c < 256; c++) tb.rowC[c] = k.rowOff[tb.bin[c]!]!
    return tb
  }

  /** Folds and clears the per-column code counts of density columns c0…c1 (one stripe). */
  foldStripe(k: Kernel, c0: number, c1: number): void {
    const { cols, rowC, cR, cG, cB } = this
    const { wr, wg, wb } = k
    for (let col = c0, o = 0; col <= c1; col++, o += 768) {
      for (let c = 0; c < 256; c++) {
        const r = cols[o + c]!; const g = cols[o + 256 + c]!; const b = cols[o + 512 + c]!
        if (r | g | b) {
          const at = rowC[c]! + col
          wr[at]! += r; wg[at]! += g; wb[at]! += b
          cR[c]! += r; cG[c]! += g; cB[c]! += b
          cols[o + c] = 0; cols[o + 256 + c] = 0; cols[o + 512 + c] = 0
        }
      }
    }
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
  r0: number, r1: number, keys: Int32Array, c0: number): number {
  const { wave, rowOff, colOf, mask, maskCol, maskRow } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo } = k.lim
  const { dl, dhi, dlo, wl, wf, wr, wg, wb } = k
  const { S, bin, out: gOut, cR, cG, cB, cMx, cMn, cols, rowC } = tb
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
      if (y < yMin) yMin = y
      if (y > yMax) yMax = y
      const hi = y + c; const lo = y - c
      if (hi > compMax) compMax = hi
      if (lo < compMin) compMin = lo
      const iy = (y * lvScale + lvOff) | 0
      const ihi = (hi * lvScale + lvOff) | 0
      const ilo = (lo * lvScale + lvOff) | 0
      dl[iy]!++
      dhi[ihi]!++
      dlo[ilo]!++
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
        if (c0 >= 0) {
          const cc = (col - c0) * 768
          cols[cc + R]!++
          cols[cc + 256 + G]!++
          cols[cc + 512 + B]!++
        }
        else {
          wr[rowC[R]! + col]!++
          wg[rowC[G]! + col]!++
          wb[rowC[B]! + col]!++
          cR[R]!++
          cG[G]!++
          cB[B]!++
        }
      }
      else {
        cR[R]!++
        cG[G]!++
        cB[B]!++
      }
    }
  }
  k.sumY += sumY; k.yMin = yMin; k.yMax = yMax; k.compMin = compMin; k.compMax = compMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
  return reps
}


/** Rows measured per call of the per-pixel route before the repeat count is looked at. */
const DIRECT_BLOCK = 8

/** Which route the 8-bit R'G'B' kernel takes: chosen per stripe as it goes (auto), or one only (for the tests). */
export const fastMode = { rgb: 'auto' as 'auto' | 'direct' | 'runs', chroma: 'auto' as 'auto' | 'table' | 'math', columns: 'auto' as 'auto' | 'always' }

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

export function rgb8(data: Uint8Array, width: number, height: number, chans: number, full: boolean, matrix: MatrixName, k: Kernel, stripe: number): { tb: RgbTables, ch: RgbChroma } {
  // As decode.ts derives them, so every product is the reference's to the bit.
  const scale = full ? 1 / 255 : 1 / 219
  const offset = full ? 0 : -16 / 219
  const tb = RgbTables.for(scale, offset, k)
  const ch = RgbChroma.for(scale, matrix, k)
  const bT = ch.bitsFor(k.lim)
  const table = fastMode.chroma === 'table' || (fastMode.chroma === 'auto' && chromaCoherent(data, width, height, chans))
  const { kr, kb, cbDiv, crDiv } = MATRICES[matrix]
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
  // A stripe spans at most stripe + 1 density columns (one when columns are decimated).
  if (k.wave && tb.cols.length < (stripe + 1) * 768) tb.cols = new Uint32Array((stripe + 1) * 768)
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const n = Math.min(stripe, width - x0)
    const c0 = k.wave ? k.colOf[x0]! : 0
    const c1 = k.wave ? k.colOf[x0 + n - 1]! : 0
    runs.fill(0)
    keys.fill(-1)
    let direct = fastMode.rgb === 'direct'
    let byColumn = false
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
        // Per-column code counts pay for their fold (256 codes a column) once enough rows
        // of the stripe are left to measure pixel by pixel; until then (and on SD-sized
        // stripes that go per pixel late) the densities are counted directly (cc = −1).
        if (!byColumn && (fastMode.columns === 'always' || (height - row) * n >= 2 * (c1 - c0 + 1) * 256)) byColumn = true
        const cc = byColumn ? c0 : -1
        const r1 = Math.min(height, row + DIRECT_BLOCK)
        const reps = table
          ? rgbRows(k, tb, ch, bT, data, width, chans, x0, n, row, r1, keys, cc)
          : rgbRowsMath(k, tb, data, width, chans, x0, n, row, r1, keys, scale, kr, kb, cbDiv, crDiv, cc)
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
      if (m) rgbBatch(k, q, tb, ch, bT, row)
      row++
      // Grain: when most runs end after a row or two, per-pixel measurement is cheaper.
      busy = 2 * m > n ? busy + 1 : 0
      if (busy >= 2 && fastMode.rgb !== 'runs') {
        m = 0
        for (let p = 0; p < n; p++) if (runs[p]) m = queueRun(m, p, x0)
        q.len = m
        if (m) rgbBatch(k, q, tb, ch, bT, row)
        direct = true
      }
    }
    if (!direct) {
      // Past the last row: every run still open ends.
      settle()
      let m = 0
      for (let p = 0; p < n; p++) if (runs[p]) m = queueRun(m, p, x0)
      q.len = m
      if (m) rgbBatch(k, q, tb, ch, bT, height)
    }
    if (byColumn && k.wave) tb.foldStripe(k, c0, c1)
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
  keys: Int32Array, scale: number, kr: number, kb: number, cbDiv: number, crDiv: number, c0: number): number {
  const { uK, vK, cbOff, hs, wave, rowOff, colOf, mask, maskCol, maskRow } = k
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo, cbHi, cbLo, crHi, crLo } = k.lim
  const bin = tb.bin
  const { dl, dhi, dlo, cbH, crH, wl, wf, wr, wg, wb, vec } = k
  const { S, out: gOut, cR, cG, cB, cMx, cMn, cols, rowC } = tb
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
      if (cb < cbMin) cbMin = cb
      if (cb > cbMax) cbMax = cb
      if (cr < crMin) crMin = cr
      if (cr > crMax) crMax = cr
      const cbi = (cb * hs + cbOff) | 0
      const cri = (cr * hs + cbOff) | 0
      cbH[cbi]!++
      crH[cri]!++
      const u = uK * pb; const v = vK * pr
      const c = 219 * Math.sqrt(u * u + v * v)
      if (c > cMax) cMax = c
      sumY += y
      if (y < yMin) yMin = y
      if (y > yMax) yMax = y
      const hi = y + c; const lo = y - c
      if (hi > compMax) compMax = hi
      if (lo < compMin) compMin = lo
      const iy = (y * lvScale + lvOff) | 0
      const ihi = (hi * lvScale + lvOff) | 0
      const ilo = (lo * lvScale + lvOff) | 0
      dl[iy]!++
      dhi[ihi]!++
      dlo[ilo]!++
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
        if (c0 >= 0) {
          const cc = (col - c0) * 768
          cols[cc + R]!++
          cols[cc + 256 + G]!++
          cols[cc + 512 + B]!++
        }
        else {
          wr[rowC[R]! + col]!++
          wg[rowC[G]! + col]!++
          wb[rowC[B]! + col]!++
          cR[R]!++
          cG[G]!++
          cB[B]!++
        }
      }
      else {
        cR[R]!++
        cG[G]!++
        cB[B]!++
      }
    }
  }
  k.sumY += sumY; k.yMin = yMin; k.yMax = yMax; k.compMin = compMin; k.compMax = compMax
  k.cbMin = cbMin; k.cbMax = cbMax; k.crMin = crMin; k.crMax = crMax; k.cMax = cMax
  k.compOut += compOut; k.gamOut += gamOut; k.studOut += studOut
  return reps
}
