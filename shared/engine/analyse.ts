import { makeRowSource, STRIPE_ALIGN } from './decode'
import type { RowSource } from './decode'
import { COMP_HI, COMP_LO, HIGH_CHROMA, HIGH_LUMA, LOW_BAND, LV_OFF, LV_SCALE, VS_LAST, VS_SCALE } from './accumulate'
import type { Accumulators, Coef, Densities, Totals } from './accumulate'
import { fastPass } from './fast/index'
import { spatialLevels, specUsesSpatial } from './lowpass'
import { MATRICES, resolveMatrix, U_WEIGHT, V_WEIGHT } from './matrix'
import { code8ToIre } from './scales'
import { builtinSpec, DEFAULT_SPEC_NAME } from './specs'
import type { DeliverySpec } from './specs'
import { evaluateSpec } from './verdict'
import { LEVEL_BINS, LEVEL_MIN, LEVEL_STEP, percentile, shareAbove, shareBelow } from './levels'
import { waveformGeometry, waveformRowOffsets, WAVEFORM_IRE_BOTTOM, WAVEFORM_IRE_TOP, WAVEFORM_ROWS } from './waveform'
import { VECTORSCOPE_EXTENT, VECTORSCOPE_SIZE } from './vectorscope'
import { MASK_HIGH, MASK_LOW, maskGeometry, maskLimits } from './mask'
import type { AnalyseOptions, FrameAnalysis, FrameInput, Histograms, LevelDistributions } from './types'

export { COMPOSITE_OUT_HIGH_IRE, COMPOSITE_OUT_LOW_IRE } from './accumulate'

/**
 * Rounding three 8-bit codes moves a decoded R', G' or B' by up to 1.41 codes (B' under BT.709:
 * 0.5 + 1.8556·0.5·219/224), so legal bars coded as Y'CbCr can decode a little outside 0..1.
 * For Y'CbCr sources the gamut share only counts what lies beyond that; R'G'B' sources carry
 * their own codes and get only the level grid's half step.
 */
export const GAMUT_MARGIN_CODE8 = 1.5
export const GAMUT_MARGIN_RGB_CODE8 = LEVEL_STEP / 2

/** Stripe width for the density pass: 48 waveform columns at 1080p, ≈ 70 kB of each density. */
const DENSITY_STRIPE = 2 * STRIPE_ALIGN

// Coarse Cb/Cr histograms are filled with a margin of 128 codes each side and folded into
// the published 0..bins−1 range at the end, so the hot loop needs no clamping.
const COARSE_PAD = 128

export function analyseFrame(input: FrameInput, opts: AnalyseOptions = {}): FrameAnalysis {
  return analyse(input, opts, true)
}

/**
 * The reference pass alone: plain per-pixel arithmetic on every pixel, no fast kernel. Kept
 * for the tests, which hold the fast kernels to it.
 */
export function analyseFrameReference(input: FrameInput, opts: AnalyseOptions = {}): FrameAnalysis {
  return analyse(input, opts, false)
}

function analyse(input: FrameInput, opts: AnalyseOptions, fast: boolean): FrameAnalysis {
  const matrix = resolveMatrix(opts.matrix)
  const src = makeRowSource(input, matrix)
  const spec: DeliverySpec = opts.spec ?? builtinSpec(DEFAULT_SPEC_NAME)!
  const { width, height } = src
  const n = width * height

  const bins = src.histBins
  const hs = bins / 256
  const padded = bins + 2 * COARSE_PAD * hs
  const cbHist = new Uint32Array(padded)
  const crHist = new Uint32Array(padded)
  const L = (): Uint32Array => new Uint32Array(LEVEL_BINS)
  const levels: LevelDistributions = {
    min: LEVEL_MIN, step: LEVEL_STEP,
    luma: L(), compMax: L(), compMin: L(), rgbMax: L(), rgbMin: L(), r: L(), g: L(), b: L(),
  }

  let dens: Densities | undefined
  let mg = { width: 0, height: 0 }
  if (opts.keepDensities) {
    const { columns, decimation } = waveformGeometry(width)
    const colOf = new Int32Array(width)
    for (let x = 0; x < width; x++) colOf[x] = Math.floor(x / decimation)
    const size = columns * WAVEFORM_ROWS
    mg = maskGeometry(width, height, opts.maskWidth)
    const maskCol = new Int32Array(width)
    for (let x = 0; x < width; x++) maskCol[x] = Math.floor(x * mg.width / width)
    const maskRow = new Int32Array(height)
    for (let y = 0; y < height; y++) maskRow[y] = Math.floor(y * mg.height / height) * mg.width
    const sc = opts.scratch
    const u32 = (name: string, n: number): Uint32Array => sc ? sc.u32(name, n) : new Uint32Array(n)
    dens = {
      columns, decimation, colOf, rowOff: waveformRowOffsets(columns),
      luma: u32('luma', size), flat: u32('flat', size), r: u32('r', size), g: u32('g', size), b: u32('b', size),
      vector: u32('vector', VECTORSCOPE_SIZE * VECTORSCOPE_SIZE),
      mask: sc ? sc.u8('mask', mg.width * mg.height) : new Uint8Array(mg.width * mg.height),
      maskCol, maskRow, lim: maskLimits(spec, bins, COARSE_PAD * hs),
    }
  }

  const t: Totals = {
    sumY: 0, yMin: Infinity, yMax: -Infinity, cbMin: Infinity, cbMax: -Infinity, crMin: Infinity, crMax: -Infinity,
    compMin: Infinity, compMax: -Infinity, cMax: 0, compositeOut: 0, gamutOut: 0, studioOut: 0,
  }
  const m = MATRICES[matrix]
  const coef: Coef = {
    uK: U_WEIGHT * m.cbDiv, vK: V_WEIGHT * m.crDiv,
    rK: 219 * m.crDiv, bK: 219 * m.cbDiv,
    // G' − Y' = −(Kr(R'−Y') + Kb(B'−Y'))/Kg
    gR: -219 * m.kr * m.crDiv / m.kg, gB: -219 * m.kb * m.cbDiv / m.kg,
    cbOff: COARSE_PAD * hs + 0.5, hs,
    gamHi: 235 + (input.kind === 'rgb' ? GAMUT_MARGIN_RGB_CODE8 : GAMUT_MARGIN_CODE8),
    gamLo: 16 - (input.kind === 'rgb' ? GAMUT_MARGIN_RGB_CODE8 : GAMUT_MARGIN_CODE8),
  }
  const acc: Accumulators = { coef, cbHist, crHist, levels, t, dens }
  if (fast && fastPass(input, matrix, acc, DENSITY_STRIPE)) {
    // The fast kernel has filled every accumulator.
  }
  else {
    const cw = (width + (1 << src.chromaShift) - 1) >> src.chromaShift
    const pbRow = new Float64Array(cw)
    const prRow = new Float64Array(cw)
    const yRow = new Float64Array(width)
    referencePass(src, yRow, pbRow, prRow, coef, cbHist, crHist, levels, t, dens)
  }
  if (opts.spatialLevels !== false || specUsesSpatial(spec)) spatialLevels(src, coef.uK, coef.vK, levels)

  const fold = (h: Uint32Array): Uint32Array => {
    const out = new Uint32Array(bins)
    const off = COARSE_PAD * hs
    for (let i = 0; i < h.length; i++) {
      const k = i - off
      out[k < 0 ? 0 : k >= bins ? bins - 1 : k]! += h[i]!
    }
    return out
  }
  const histograms: Histograms = {
    bins,
    y: coarseFromLevels(levels.luma, bins, hs, 0),
    cb: fold(cbHist),
    cr: fold(crHist),
    rgbCoding: src.rgbCoding,
    r: coarseFromLevels(levels.r, bins, src.rgbHistScale / 219, src.rgbHistOffset - 16 * src.rgbHistScale / 219),
    g: coarseFromLevels(levels.g, bins, src.rgbHistScale / 219, src.rgbHistOffset - 16 * src.rgbHistScale / 219),
    b: coarseFromLevels(levels.b, bins, src.rgbHistScale / 219, src.rgbHistOffset - 16 * src.rgbHistScale / 219),
    levels,
  }
  // Percentiles are read at a bin centre, up to an eighth of a code from the level itself:
  // keep them inside the exact extremes so that min ≤ p1 and p99 ≤ max always hold.
  const pct = (p: number) => Math.min(t.yMax, Math.max(t.yMin, percentile(levels.luma, n, p)))
  const luma = {
    min: t.yMin,
    p1: pct(0.01),
    p10: pct(0.10),
    p50: pct(0.50),
    mean: t.sumY / n,
    p90: pct(0.90),
    p99: pct(0.99),
    max: t.yMax,
  }
  const base = {
    width, height, bitDepth: src.bitDepth, matrix, range: src.range,
    luma,
    lumaIre: { min: code8ToIre(luma.min), mean: code8ToIre(luma.mean), max: code8ToIre(luma.max) },
    compositeIre: { min: code8ToIre(t.compMin), max: code8ToIre(t.compMax) },
    chroma: {
      cbMin: t.cbMin, cbMax: t.cbMax, crMin: t.crMin, crMax: t.crMax,
      // t.cMax is the amplitude in codes; p-p on the setup scale is 2·92.5·C (SMPTE 170M IRE scale with setup — memory; computed).
      ppMaxIre: 2 * 92.5 * t.cMax / 219,
    },
    shares: {
      belowBlack: shareBelow(levels.luma, LEVEL_MIN, LEVEL_STEP, 16, n),
      aboveWhite: shareAbove(levels.luma, LEVEL_MIN, LEVEL_STEP, 235, n),
      compositeOut: t.compositeOut / n,
      gamutOut: t.gamutOut / n,
      clipped: shareAbove(levels.luma, LEVEL_MIN, LEVEL_STEP, src.topCode8 - LEVEL_STEP / 2, n),
      crushed: shareBelow(levels.luma, LEVEL_MIN, LEVEL_STEP, src.bottomCode8 + LEVEL_STEP / 2, n),
      studioOut: t.studioOut / n,
    },
    histograms,
  }
  const v = evaluateSpec(base, spec)
  const out: FrameAnalysis = { ...base, verdict: v.verdict, reasons: v.reasons }
  if (dens) {
    out.waveform = {
      columns: dens.columns, rows: WAVEFORM_ROWS, ireBottom: WAVEFORM_IRE_BOTTOM, ireTop: WAVEFORM_IRE_TOP,
      decimation: dens.decimation, luma: dens.luma, flat: dens.flat, rgb: { r: dens.r, g: dens.g, b: dens.b },
    }
    out.vectorscope = { size: VECTORSCOPE_SIZE, extent: VECTORSCOPE_EXTENT, data: dens.vector }
    out.rangeMask = { width: mg.width, height: mg.height, data: dens.mask }
  }
  return out
}

/** The reference pass: the source read a row (or stripe) at a time into the engine's working form. */
function referencePass(
  src: RowSource, yRow: Float64Array, pbRow: Float64Array, prRow: Float64Array, coef: Coef,
  cbHist: Uint32Array, crHist: Uint32Array, levels: LevelDistributions, t: Totals, dens: Densities | undefined,
): void {
  const { width, height } = src
  if (dens) {
    // In vertical stripes, so the part of the waveform densities a stripe touches stays in
    // cache: whole rows would spread six increments per pixel over megabytes.
    for (let x0 = 0; x0 < width; x0 += DENSITY_STRIPE) {
      const x1 = Math.min(width, x0 + DENSITY_STRIPE)
      for (let row = 0; row < height; row++) {
        src.readYcc(row, yRow, pbRow, prRow, x0, x1)
        rowPassWithDensities(yRow, pbRow, prRow, x0, x1 - x0, row, src.chromaShift, coef, cbHist, crHist, levels, t, dens)
      }
    }
  }
  else {
    for (let row = 0; row < height; row++) {
      src.readYcc(row, yRow, pbRow, prRow, 0, width)
      rowPass(yRow, pbRow, prRow, width, src.chromaShift, coef, cbHist, crHist, levels, t)
    }
  }
}

/**
 * A coarse histogram from a level distribution: level bin centre v goes to coarse bin
 * round(offset + scale·v). Each quarter-code level bin holds at most one 8-bit or 10-bit code,
 * so for Y'CbCr and 8-bit R'G'B' sources this is the histogram of the codes themselves.
 */
function coarseFromLevels(d: Uint32Array, bins: number, scale: number, offset: number): Uint32Array {
  const out = new Uint32Array(bins)
  for (let i = 0; i < d.length; i++) {
    const c = d[i]!
    if (!c) continue
    const k = Math.floor(offset + scale * (LEVEL_MIN + i * LEVEL_STEP) + 0.5)
    out[k < 0 ? 0 : k >= bins ? bins - 1 : k]! += c
  }
  return out
}

/**
 * One line of the picture into every accumulator. Chroma-only work (Cb/Cr, chroma amplitude,
 * R'G'B' offsets, the vectorscope) runs when the chroma sample changes: every pixel for
 * 4:4:4 and R'G'B', every second pixel for 4:2:2. The pass with densities is a copy of this
 * one with the waveform stores added, so the common case carries no per-pixel test for them;
 * a shared helper would cost a call or an object per pixel in the hot loop.
 */
function rowPass(
  Y: Float64Array, PB: Float64Array, PR: Float64Array, width: number, shift: number, k: Coef,
  cbHist: Uint32Array, crHist: Uint32Array, lv: LevelDistributions, t: Totals,
): void {
  const { uK, vK, rK, bK, gR, gB, cbOff, hs, gamHi, gamLo } = k
  const dl = lv.luma; const dhi = lv.compMax; const dlo = lv.compMin; const dmx = lv.rgbMax; const dmn = lv.rgbMin
  const dr = lv.r; const dg = lv.g; const db = lv.b
  // Module constants as locals: an imported binding is a cell load with a hole check on
  // every use, which V8 would otherwise repeat per pixel in the loop below.
  const lvScale = LV_SCALE; const lvOff = LV_OFF; const compHi = COMP_HI; const compLo = COMP_LO
  const lowBand = LOW_BAND; const highChroma = HIGH_CHROMA; const highLuma = HIGH_LUMA
  let sumY = 0; let yMin = t.yMin; let yMax = t.yMax; let compMin = t.compMin; let compMax = t.compMax
  let cbMin = t.cbMin; let cbMax = t.cbMax; let crMin = t.crMin; let crMax = t.crMax; let cMax = t.cMax
  let compOut = 0; let gamOut = 0; let studOut = 0
  let c = 0; let ro = 0; let go = 0; let bo = 0; let mxo = 0; let mno = 0; let cOut = false
  let lastJ = -1
  for (let x = 0; x < width; x++) {
    const j = x >> shift
    if (j !== lastJ) {
      lastJ = j
      const pb = PB[j]!; const pr = PR[j]!
      const cnt = shift && x + 1 < width ? 2 : 1
      const cb = 128 + 224 * pb
      const cr = 128 + 224 * pr
      cbMin = Math.min(cbMin, cb); cbMax = Math.max(cbMax, cb)
      crMin = Math.min(crMin, cr); crMax = Math.max(crMax, cr)
      cbHist[(cb * hs + cbOff) | 0]! += cnt
      crHist[(cr * hs + cbOff) | 0]! += cnt
      const u = uK * pb; const v = vK * pr
      c = 219 * Math.sqrt(u * u + v * v)
      cMax = Math.max(cMax, c)
      ro = rK * pr; bo = bK * pb; go = gR * pr + gB * pb
      mxo = ro > go ? (ro > bo ? ro : bo) : (go > bo ? go : bo)
      mno = ro < go ? (ro < bo ? ro : bo) : (go < bo ? go : bo)
      cOut = cb < lowBand || cb >= highChroma || cr < lowBand || cr >= highChroma
    }
    const y = Y[x]!
    sumY += y
    yMin = Math.min(yMin, y); yMax = Math.max(yMax, y)
    const hi = y + c; const lo = y - c
    compMax = Math.max(compMax, hi); compMin = Math.min(compMin, lo)
    const mx = y + mxo; const mn = y + mno
    dl[(y * lvScale + lvOff) | 0]!++
    dhi[(hi * lvScale + lvOff) | 0]!++
    dlo[(lo * lvScale + lvOff) | 0]!++
    dmx[(mx * lvScale + lvOff) | 0]!++
    dmn[(mn * lvScale + lvOff) | 0]!++
    dr[((y + ro) * lvScale + lvOff) | 0]!++
    dg[((y + go) * lvScale + lvOff) | 0]!++
    db[((y + bo) * lvScale + lvOff) | 0]!++
    if (hi > compHi || lo < compLo) compOut++
    if (mx > gamHi || mn < gamLo) gamOut++
    if (cOut || y < lowBand || y >= highLuma) studOut++
  }
  t.sumY += sumY; t.yMin = yMin; t.yMax = yMax; t.compMin = compMin; t.compMax = compMax
  t.cbMin = cbMin; t.cbMax = cbMax; t.crMin = crMin; t.crMax = crMax; t.cMax = cMax
  t.compositeOut += compOut; t.gamutOut += gamOut; t.studioOut += studOut
}

function rowPassWithDensities(
  Y: Float64Array, PB: Float64Array, PR: Float64Array, x0: number, width: number, row: number, shift: number, k: Coef,
  cbHist: Uint32Array, crHist: Uint32Array, lv: LevelDistributions, t: Totals, d: Densities,
): void {
  const { uK, vK, rK, bK, gR, gB, cbOff, hs, gamHi, gamLo } = k
  const dl = lv.luma; const dhi = lv.compMax; const dlo = lv.compMin; const dmx = lv.rgbMax; const dmn = lv.rgbMin
  const dr = lv.r; const dg = lv.g; const db = lv.b
  const { colOf, rowOff, luma: wl, flat: wf, r: wr, g: wg, b: wb, vector, mask, maskCol } = d
  const { yHi, yLo, cHi, cLo, rgbHi, rgbLo, cbHi, cbLo, crHi, crLo } = d.lim
  const mRow = d.maskRow[row]!
  let cbi = 0; let cri = 0
  // Module constants as locals: an imported binding is a cell load with a hole check on
  // every use, which V8 would otherwise repeat per pixel in the loop below.
  const lvScale = LV_SCALE; const lvOff = LV_OFF; const compHi = COMP_HI; const compLo = COMP_LO
  const lowBand = LOW_BAND; const highChroma = HIGH_CHROMA; const highLuma = HIGH_LUMA
  const vsExt = VECTORSCOPE_EXTENT; const vsScale = VS_SCALE; const vsLast = VS_LAST
  const vsSize = VECTORSCOPE_SIZE
  let sumY = 0; let yMin = t.yMin; let yMax = t.yMax; let compMin = t.compMin; let compMax = t.compMax
  let cbMin = t.cbMin; let cbMax = t.cbMax; let crMin = t.crMin; let crMax = t.crMax; let cMax = t.cMax
  let compOut = 0; let gamOut = 0; let studOut = 0
  let c = 0; let ro = 0; let go = 0; let bo = 0; let mxo = 0; let mno = 0; let cOut = false
  let lastJ = -1
  for (let x = 0; x < width; x++) {
    const j = x >> shift
    if (j !== lastJ) {
      lastJ = j
      const pb = PB[j]!; const pr = PR[j]!
      const cnt = shift && x + 1 < width ? 2 : 1
      const cb = 128 + 224 * pb
      const cr = 128 + 224 * pr
      cbMin = Math.min(cbMin, cb); cbMax = Math.max(cbMax, cb)
      crMin = Math.min(crMin, cr); crMax = Math.max(crMax, cr)
      cbi = (cb * hs + cbOff) | 0
      cri = (cr * hs + cbOff) | 0
      cbHist[cbi]! += cnt
      crHist[cri]! += cnt
      const u = uK * pb; const v = vK * pr
      c = 219 * Math.sqrt(u * u + v * v)
      cMax = Math.max(cMax, c)
      ro = rK * pr; bo = bK * pb; go = gR * pr + gB * pb
      mxo = ro > go ? (ro > bo ? ro : bo) : (go > bo ? go : bo)
      mno = ro < go ? (ro < bo ? ro : bo) : (go < bo ? go : bo)
      cOut = cb < lowBand || cb >= highChroma || cr < lowBand || cr >= highChroma
      let vc = Math.floor((u + vsExt) * vsScale)
      let vr = Math.floor((vsExt - v) * vsScale)
      vc = vc < 0 ? 0 : vc > vsLast ? vsLast : vc
      vr = vr < 0 ? 0 : vr > vsLast ? vsLast : vr
      vector[vr * vsSize + vc]! += cnt
    }
    const col = colOf[x0 + x]!
    const y = Y[x]!
    sumY += y
    yMin = Math.min(yMin, y); yMax = Math.max(yMax, y)
    const hi = y + c; const lo = y - c
    compMax = Math.max(compMax, hi); compMin = Math.min(compMin, lo)
    const mx = y + mxo; const mn = y + mno
    const iy = (y * lvScale + lvOff) | 0
    const ihi = (hi * lvScale + lvOff) | 0
    const ilo = (lo * lvScale + lvOff) | 0
    const ir = ((y + ro) * lvScale + lvOff) | 0
    const ig = ((y + go) * lvScale + lvOff) | 0
    const ib = ((y + bo) * lvScale + lvOff) | 0
    dl[iy]!++
    dhi[ihi]!++
    dlo[ilo]!++
    const imx = (mx * lvScale + lvOff) | 0
    const imn = (mn * lvScale + lvOff) | 0
    dmx[imx]!++
    dmn[imn]!++
    dr[ir]!++
    dg[ig]!++
    db[ib]!++
    mask[mRow + maskCol[x0 + x]!]! |= (+(iy >= yHi) | +(ihi >= cHi) | +(imx >= rgbHi) | +(cbi >= cbHi) | +(cri >= crHi)) * MASK_HIGH
      | (+(iy <= yLo) | +(ilo <= cLo) | +(imn <= rgbLo) | +(cbi <= cbLo) | +(cri <= crLo)) * MASK_LOW
    wl[rowOff[iy]! + col]!++
    wf[rowOff[ihi]! + col]!++
    wf[rowOff[ilo]! + col]!++
    wr[rowOff[ir]! + col]!++
    wg[rowOff[ig]! + col]!++
    wb[rowOff[ib]! + col]!++
    if (hi > compHi || lo < compLo) compOut++
    if (mx > gamHi || mn < gamLo) gamOut++
    if (cOut || y < lowBand || y >= highLuma) studOut++
  }
  t.sumY += sumY; t.yMin = yMin; t.yMax = yMax; t.compMin = compMin; t.compMax = compMax
  t.cbMin = cbMin; t.cbMax = cbMax; t.crMin = crMin; t.crMax = crMax; t.cMax = cMax
  t.compositeOut += compOut; t.gamutOut += gamOut; t.studioOut += studOut
}

/**
 * Buffers for the densities and the mask that one caller reuses from frame to frame: a
 * worker that analyses frames one after another saves allocating (and the collector
 * reclaiming) about 8 MB per 1080p frame. The densities of a result made with a scratch
 * are its buffers, so they hold only until the next analysis with the same scratch.
 */
export class AnalysisScratch {
  private readonly bufs = new Map<string, Uint32Array | Uint8Array>()

  u32(name: string, n: number): Uint32Array {
    let b = this.bufs.get(name)
    if (!(b instanceof Uint32Array) || b.length !== n) this.bufs.set(name, b = new Uint32Array(n))
    else b.fill(0)
    return b
  }

  /** n bytes left as their last user left them: for a caller that overwrites every byte (drawn images, line data). */
  raw(name: string, n: number): Uint8Array {
    let b = this.bufs.get(name)
    if (!(b instanceof Uint8Array) || b.length !== n) this.bufs.set(name, b = new Uint8Array(n))
    return b
  }

  u8(name: string, n: number): Uint8Array {
    let b = this.bufs.get(name)
    if (!(b instanceof Uint8Array) || b.length !== n) this.bufs.set(name, b = new Uint8Array(n))
    else b.fill(0)
    return b
  }
}

