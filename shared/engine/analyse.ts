import { makeRowBuffers, makeRowSource } from './decode'
import type { RowSource } from './decode'
import { MATRICES, U_WEIGHT, V_WEIGHT } from './matrix'
import { code8ToIre, ireToCode8 } from './scales'
import { builtinSpec, DEFAULT_SPEC_NAME } from './specs'
import type { DeliverySpec } from './specs'
import { evaluateSpec } from './verdict'
import { LEVEL_BINS, LEVEL_MIN, LEVEL_STEP, percentile, shareAbove, shareBelow } from './levels'
import { newWaveformAccumulator } from './waveform'
import { newVectorscopeAccumulator } from './vectorscope'
import type { AnalyseOptions, FrameAnalysis, FrameInput, Histograms, LevelDistributions, MatrixName } from './types'

/** Composite limits behind shares.compositeOut: −20…+120 IRE (REFERENCE.md §6, NTSC practice). */
export const COMPOSITE_OUT_LOW_IRE = -20
export const COMPOSITE_OUT_HIGH_IRE = 120

/**
 * Rounding three 8-bit codes moves a decoded R', G' or B' by up to 1.41 codes (B' under BT.709:
 * 0.5 + 1.8556·0.5·219/224), so legal bars coded as Y'CbCr can decode a little outside 0..1.
 * The gamut share only counts what lies beyond that.
 */
export const GAMUT_MARGIN_CODE8 = 1.5

const LOW_BAND = 16 - LEVEL_STEP / 2
const HIGH_LUMA = 235 + LEVEL_STEP / 2
const HIGH_CHROMA = 240 + LEVEL_STEP / 2

export function resolveMatrix(m: string | undefined): MatrixName {
  if (m === undefined || m === '601') return '601'
  if (m === '709') return '709'
  throw new Error(`unknown matrix "${m}" (use 601 or 709)`)
}

interface Accumulated {
  n: number
  sumY: number
  yMin: number
  yMax: number
  cbMin: number
  cbMax: number
  crMin: number
  crMax: number
  compMin: number
  compMax: number
  cMax: number
  compositeOut: number
  gamutOut: number
  studioOut: number
}

export function analyseFrame(input: FrameInput, opts: AnalyseOptions = {}): FrameAnalysis {
  const matrix = resolveMatrix(opts.matrix)
  const src = makeRowSource(input, matrix)
  const spec: DeliverySpec = opts.spec ?? builtinSpec(DEFAULT_SPEC_NAME)!
  const { width, height } = src

  const bins = src.histBins
  const hs = bins / 256
  const hist = {
    y: new Uint32Array(bins), cb: new Uint32Array(bins), cr: new Uint32Array(bins),
    r: new Uint32Array(bins), g: new Uint32Array(bins), b: new Uint32Array(bins),
  }
  const levels: LevelDistributions = {
    min: LEVEL_MIN, step: LEVEL_STEP,
    luma: new Uint32Array(LEVEL_BINS), compMax: new Uint32Array(LEVEL_BINS), compMin: new Uint32Array(LEVEL_BINS),
    rgbMax: new Uint32Array(LEVEL_BINS), rgbMin: new Uint32Array(LEVEL_BINS),
  }
  const wf = opts.keepDensities ? newWaveformAccumulator(width) : undefined
  const vs = opts.keepDensities ? newVectorscopeAccumulator() : undefined

  const buf = makeRowBuffers(width)
  const acc: Accumulated = {
    n: 0, sumY: 0, yMin: Infinity, yMax: -Infinity, cbMin: Infinity, cbMax: -Infinity, crMin: Infinity, crMax: -Infinity,
    compMin: Infinity, compMax: -Infinity, cMax: 0, compositeOut: 0, gamutOut: 0, studioOut: 0,
  }
  const m = MATRICES[matrix]
  const uK = U_WEIGHT * m.cbDiv
  const vK = V_WEIGHT * m.crDiv
  for (let row = 0; row < height; row++) {
    src.readRow(row, buf)
    accumulateRow(buf.y, buf.pb, buf.pr, buf.r, buf.g, buf.b, width, src, hs, uK, vK, hist, levels, acc)
    if (wf) wf.addRow(buf, uK, vK)
    if (vs) vs.addRow(buf, width, uK, vK)
  }

  const n = width * height
  const histograms: Histograms = {
    bins, y: hist.y, cb: hist.cb, cr: hist.cr, rgbCoding: src.rgbCoding, r: hist.r, g: hist.g, b: hist.b, levels,
  }
  const luma = {
    min: acc.yMin,
    p1: percentile(levels.luma, n, 0.01),
    p10: percentile(levels.luma, n, 0.10),
    p50: percentile(levels.luma, n, 0.50),
    mean: acc.sumY / n,
    p90: percentile(levels.luma, n, 0.90),
    p99: percentile(levels.luma, n, 0.99),
    max: acc.yMax,
  }
  const base = {
    width, height, bitDepth: src.bitDepth, matrix, range: src.range,
    luma,
    lumaIre: { min: code8ToIre(luma.min), mean: code8ToIre(luma.mean), max: code8ToIre(luma.max) },
    compositeIre: { min: code8ToIre(acc.compMin), max: code8ToIre(acc.compMax) },
    chroma: {
      cbMin: acc.cbMin, cbMax: acc.cbMax, crMin: acc.crMin, crMax: acc.crMax,
      // acc.cMax is the amplitude in codes; p-p on the setup scale is 2·92.5·C (REFERENCE.md §4).
      ppMaxIre: 2 * 92.5 * acc.cMax / 219,
    },
    shares: {
      belowBlack: shareBelow(levels.luma, LEVEL_MIN, LEVEL_STEP, 16, n),
      aboveWhite: shareAbove(levels.luma, LEVEL_MIN, LEVEL_STEP, 235, n),
      compositeOut: acc.compositeOut / n,
      gamutOut: acc.gamutOut / n,
      clipped: shareAbove(levels.luma, LEVEL_MIN, LEVEL_STEP, src.topCode8 - LEVEL_STEP / 2, n),
      crushed: shareBelow(levels.luma, LEVEL_MIN, LEVEL_STEP, src.bottomCode8 + LEVEL_STEP / 2, n),
      studioOut: acc.studioOut / n,
    },
    histograms,
  }
  const v = evaluateSpec(base, spec)
  const out: FrameAnalysis = { ...base, verdict: v.verdict, reasons: v.reasons }
  if (wf) out.waveform = wf.result()
  if (vs) out.vectorscope = vs.result()
  return out
}

// Kept as a free function over plain locals: V8 keeps the hot loop monomorphic and the
// accumulators in registers, which an object method or per-pixel callback would not.
function accumulateRow(
  Y: Float64Array, PB: Float64Array, PR: Float64Array, R: Float64Array, G: Float64Array, B: Float64Array,
  width: number, src: RowSource, hs: number, uK: number, vK: number,
  hist: { y: Uint32Array, cb: Uint32Array, cr: Uint32Array, r: Uint32Array, g: Uint32Array, b: Uint32Array },
  levels: LevelDistributions, acc: Accumulated,
): void {
  const last = hist.y.length - 1
  const hy = hist.y; const hcb = hist.cb; const hcr = hist.cr; const hr = hist.r; const hg = hist.g; const hb = hist.b
  const dl = levels.luma; const dhi = levels.compMax; const dlo = levels.compMin; const dmx = levels.rgbMax; const dmn = levels.rgbMin
  const rs = src.rgbHistScale; const ro = src.rgbHistOffset + 0.5
  const compHi = ireToCode8(COMPOSITE_OUT_HIGH_IRE); const compLo = ireToCode8(COMPOSITE_OUT_LOW_IRE)
  const gamHi = 235 + GAMUT_MARGIN_CODE8; const gamLo = 16 - GAMUT_MARGIN_CODE8
  const lvOff = -LEVEL_MIN * 4 + 0.5
  const lvLast = LEVEL_BINS - 1
  let sumY = 0; let yMin = acc.yMin; let yMax = acc.yMax
  let cbMin = acc.cbMin; let cbMax = acc.cbMax; let crMin = acc.crMin; let crMax = acc.crMax
  let compMin = acc.compMin; let compMax = acc.compMax; let cMax = acc.cMax
  let compOut = 0; let gamOut = 0; let studOut = 0
  for (let x = 0; x < width; x++) {
    const y = Y[x]!; const pb = PB[x]!; const pr = PR[x]!
    sumY += y
    if (y < yMin) yMin = y
    if (y > yMax) yMax = y
    const cb = 128 + 224 * pb
    const cr = 128 + 224 * pr
    if (cb < cbMin) cbMin = cb
    if (cb > cbMax) cbMax = cb
    if (cr < crMin) crMin = cr
    if (cr > crMax) crMax = cr
    const u = uK * pb; const v = vK * pr
    const c = 219 * Math.sqrt(u * u + v * v)
    if (c > cMax) cMax = c
    const hi = y + c; const lo = y - c
    if (hi > compMax) compMax = hi
    if (lo < compMin) compMin = lo
    const r = 16 + 219 * R[x]!; const g = 16 + 219 * G[x]!; const b = 16 + 219 * B[x]!
    const mx = r > g ? (r > b ? r : b) : (g > b ? g : b)
    const mn = r < g ? (r < b ? r : b) : (g < b ? g : b)

    let i = (y * 4 + lvOff) | 0; dl[i < 0 ? 0 : i > lvLast ? lvLast : i]!++
    i = (hi * 4 + lvOff) | 0; dhi[i < 0 ? 0 : i > lvLast ? lvLast : i]!++
    i = (lo * 4 + lvOff) | 0; dlo[i < 0 ? 0 : i > lvLast ? lvLast : i]!++
    i = (mx * 4 + lvOff) | 0; dmx[i < 0 ? 0 : i > lvLast ? lvLast : i]!++
    i = (mn * 4 + lvOff) | 0; dmn[i < 0 ? 0 : i > lvLast ? lvLast : i]!++

    i = (y * hs + 0.5) | 0; hy[i < 0 ? 0 : i > last ? last : i]!++
    i = (cb * hs + 0.5) | 0; hcb[i < 0 ? 0 : i > last ? last : i]!++
    i = (cr * hs + 0.5) | 0; hcr[i < 0 ? 0 : i > last ? last : i]!++
    i = (R[x]! * rs + ro) | 0; hr[i < 0 ? 0 : i > last ? last : i]!++
    i = (G[x]! * rs + ro) | 0; hg[i < 0 ? 0 : i > last ? last : i]!++
    i = (B[x]! * rs + ro) | 0; hb[i < 0 ? 0 : i > last ? last : i]!++

    if (hi > compHi || lo < compLo) compOut++
    if (mx > gamHi || mn < gamLo) gamOut++
    if (y < LOW_BAND || y >= HIGH_LUMA || cb < LOW_BAND || cb >= HIGH_CHROMA || cr < LOW_BAND || cr >= HIGH_CHROMA) studOut++
  }
  acc.n += width
  acc.sumY += sumY
  acc.yMin = yMin; acc.yMax = yMax
  acc.cbMin = cbMin; acc.cbMax = cbMax; acc.crMin = crMin; acc.crMax = crMax
  acc.compMin = compMin; acc.compMax = compMax; acc.cMax = cMax
  acc.compositeOut += compOut; acc.gamutOut += gamOut; acc.studioOut += studOut
}
