// Bars check: recognise a colour-bar frame, sample each bar, and measure the line-up errors
// (black level, setup, luma gain, chroma gain, hue) against the published bar tables.
//
// Tables: the bar colours are the R'G'B' of 75 % and 100 % bars (ITU-R BT.801-1 Table 1 for
// BT.601, SMPTE RP 219 / ITU-R BT.2111 Table 2 for BT.709 HD), and the luma, chroma
// peak-to-peak and phase of every bar follow from them through the BT.601/BT.709 equations and
// the SMPTE 170M composite weighting (U = 0.492111 (B'−Y'), V = 0.877283 (R'−Y')), which is how
// SMPTE EG 1 tabulates 75 % bars with setup. Tolerances are common practice, not a standard.
import { DEFAULT_BARS_TOLERANCES } from './bars-tolerances'
import type { BarsTolerances } from './bars-tolerances'
import { makeRowBuffers, makeRowSource } from './decode'
import { barRgb, MATRICES, resolveMatrix, rgbToYPbPr, U_WEIGHT, V_WEIGHT } from './matrix'
import type { BarName } from './matrix'
import { code8ToIre, ireToCode8, SETUP_IRE, SETUP_SPAN_IRE } from './scales'
import type { DeliverySpec } from './specs'
import type { FrameInput, MatrixName } from './types'

export const BARS_PATTERNS = ['sd-75-full', 'sd-100-full', 'sd-75-split', 'hd-rp219'] as const
export type BarsPattern = typeof BARS_PATTERNS[number]

export const BARS_PATTERN_LABELS: Record<BarsPattern, string> = {
  'sd-75-full': '75 % bars, full field',
  'sd-100-full': '100 % bars, full field',
  'sd-75-split': '75 % bars, split field (reverse-blue row and PLUGE)',
  'hd-rp219': 'HD bars (SMPTE RP 219)',
}

export { BarsTolerancesSchema, DEFAULT_BARS_TOLERANCES } from './bars-tolerances'
export type { BarsTolerances } from './bars-tolerances'
export const BARS_TOLERANCE_SOURCE = 'common practice (no published standard): luma ±1 IRE, chroma gain ±3 %, phase ±2°'

/** The spec's own bars tolerances, else common practice. */
export function barsTolerancesFor(spec: DeliverySpec | undefined): BarsTolerances {
  return spec?.barsTolerances ?? DEFAULT_BARS_TOLERANCES
}

export interface SampleRegion { x0: number, x1: number, y0: number, y1: number }

export interface BarFigure {
  name: BarName | 'grey'
  region: SampleRegion
  /** Measured and table luma as 8-bit-equivalent codes. */
  lumaCode8: number
  expectedCode8: number
  lumaIre: number
  expectedIre: number
  lumaErrorIre: number
  /** Composite-equivalent U and V (Y' units), for the vectorscope. */
  u: number
  v: number
  chromaPpIre: number
  expectedChromaPpIre: number
  chromaErrorIre: number
  /** Measured chroma amplitude as a percentage of the table's. */
  chromaPct: number | null
  phaseDeg: number | null
  expectedPhaseDeg: number | null
  phaseErrorDeg: number | null
  /** Spread of luma in the sampled region (p90 − p10, 8-bit codes): a flat bar is near 0. */
  spreadCode8: number
}

export interface PlugeStep { label: string, region: SampleRegion, lumaIre: number, relativeIre: number }

export interface BarsReason { check: string, value: number, tolerance: number, unit: string, message: string }

export interface BarsResult {
  recognised: boolean
  pattern: BarsPattern | null
  label: string | null
  /** 0..1: how well the frame fits the pattern's geometry, order and flatness. */
  confidence: number
  /** Why the frame was not judged, or what lowered the confidence. */
  notes: string[]
  matrix: MatrixName
  /** 75 or 100: the amplitude of the coloured bars. */
  amplitude: 75 | 100 | null
  /**
   * The scale the codes are read on to compare with SMPTE EG 1: `ire` (code 16 = 7.5 IRE, black
   * at digital black, setup added by an encoder) or `ire0` (code 16 = 0 IRE, when the codes
   * carry the 7.5 IRE pedestal themselves).
   */
  scale: 'ire' | 'ire0' | null
  blackCode8: number | null
  bars: BarFigure[]
  blackIre: number | null
  blackOffsetIre: number | null
  setup: 'present' | 'absent' | null
  lumaGainPct: number | null
  lumaGainErrorPct: number | null
  chromaGainPct: number | null
  chromaGainErrorPct: number | null
  hueErrorDeg: number | null
  pluge: PlugeStep[] | null
  verdict: 'pass' | 'fail' | null
  reasons: BarsReason[]
  tolerances: BarsTolerances
  toleranceSource: string
}

// One sample of the picture in the engine's working units.
interface Px { y: number, pb: number, pr: number }

const COLOUR_ORDER: BarName[] = ['yellow', 'cyan', 'green', 'magenta', 'red', 'blue']

function composite(pb: number, pr: number, matrix: MatrixName): { u: number, v: number, c: number, phase: number } {
  const m = MATRICES[matrix]
  const u = U_WEIGHT * m.cbDiv * pb
  const v = V_WEIGHT * m.crDiv * pr
  let phase = Math.atan2(v, u) * 180 / Math.PI
  if (phase < 0) phase += 360
  return { u, v, c: Math.hypot(u, v), phase }
}

const angleDiff = (a: number, b: number) => ((a - b + 540) % 360) - 180

function median(a: number[]): number {
  const s = [...a].sort((p, q) => p - q)
  const n = s.length
  return n % 2 ? s[(n - 1) / 2]! : (s[n / 2 - 1]! + s[n / 2]!) / 2
}
function quantile(s: number[], q: number): number {
  const i = Math.min(s.length - 1, Math.max(0, Math.round(q * (s.length - 1))))
  return s[i]!
}

/** Reads the picture once into row-decimated planes (every `step`-th row), in working units. */
class Picture {
  readonly width: number
  readonly height: number
  readonly step: number
  readonly rows: number[]
  readonly y: Float32Array[]
  readonly pb: Float32Array[]
  readonly pr: Float32Array[]
  constructor(input: FrameInput, matrix: MatrixName) {
    const src = makeRowSource(input, matrix)
    this.width = src.width
    this.height = src.height
    // About 300 rows are plenty to find the pattern's rows and sample each bar.
    this.step = Math.max(1, Math.ceil(src.height / 300))
    this.rows = []
    this.y = []; this.pb = []; this.pr = []
    const buf = makeRowBuffers(src.width)
    for (let r = 0; r < src.height; r += this.step) {
      src.readRow(r, buf)
      this.rows.push(r)
      this.y.push(Float32Array.from(buf.y)); this.pb.push(Float32Array.from(buf.pb)); this.pr.push(Float32Array.from(buf.pr))
    }
  }

  /** Index into the decimated rows of the row nearest to `r`. */
  at(r: number): number {
    return Math.min(this.rows.length - 1, Math.max(0, Math.round(r / this.step)))
  }

  /** Median Y, Pb, Pr and the luma spread over a region (rows and columns inclusive-exclusive). */
  sample(reg: SampleRegion): Px & { spread: number } {
    const ys: number[] = []; const pbs: number[] = []; const prs: number[] = []
    const i0 = Math.ceil(reg.y0 / this.step); const i1 = Math.max(i0 + 1, Math.ceil(reg.y1 / this.step))
    const xStep = Math.max(1, Math.floor((reg.x1 - reg.x0) / 64))
    for (let i = i0; i < i1 && i < this.rows.length; i++) {
      for (let x = reg.x0; x < reg.x1; x += xStep) {
        ys.push(this.y[i]![x]!); pbs.push(this.pb[i]![x]!); prs.push(this.pr[i]![x]!)
      }
    }
    const sorted = [...ys].sort((a, b) => a - b)
    return { y: median(ys), pb: median(pbs), pr: median(prs), spread: quantile(sorted, 0.9) - quantile(sorted, 0.1) }
  }

  /** Mean of rows y0..y1 per column: the profile a band of the picture makes across the width. */
  profile(y0: number, y1: number): Px[] {
    const i0 = this.at(y0); const i1 = Math.max(i0 + 1, this.at(y1))
    const out: Px[] = []
    for (let x = 0; x < this.width; x++) {
      let y = 0; let pb = 0; let pr = 0
      for (let i = i0; i < i1; i++) { y += this.y[i]![x]!; pb += this.pb[i]![x]!; pr += this.pr[i]![x]! }
      const n = i1 - i0
      out.push({ y: y / n, pb: pb / n, pr: pr / n })
    }
    return out
  }
}

interface Segment { x0: number, x1: number, centre: number, px: Px, u: number, v: number, c: number, phase: number }

// A change of more than this between neighbouring columns (8-bit codes of Y, Cb or Cr) is an
// edge; the bars' own steps are tens of codes, noise of a capture averaged over rows is far less.
const EDGE_CODES = 3

function segments(p: Px[], matrix: MatrixName, minLen: number): Segment[] {
  const out: Segment[] = []
  let start = 0
  const close = (end: number) => {
    if (end - start >= minLen) {
      const inner0 = start + Math.floor((end - start) / 4); const inner1 = end - Math.floor((end - start) / 4)
      const part = p.slice(inner0, Math.max(inner0 + 1, inner1))
      const px = { y: median(part.map(q => q.y)), pb: median(part.map(q => q.pb)), pr: median(part.map(q => q.pr)) }
      const ce = composite(px.pb, px.pr, matrix)
      out.push({ x0: start, x1: end, centre: (start + end) / 2, px, ...ce })
    }
  }
  for (let x = 1; x < p.length; x++) {
    const a = p[x - 1]!; const b = p[x]!
    if (Math.abs(a.y - b.y) > EDGE_CODES || 224 * Math.abs(a.pb - b.pb) > EDGE_CODES || 224 * Math.abs(a.pr - b.pr) > EDGE_CODES) {
      close(x)
      start = x
    }
  }
  close(p.length)
  return out
}

// Achromatic: chroma amplitude below 3 % of the white–black span (75 % yellow carries 34 %).
const GREY_C = 0.03
// The coloured bars must lie within this many degrees of their hue to be taken as bars at all
// (a hue error of this size would be read, not refused).
const PHASE_WINDOW = 20

interface Run { start: number, segs: Segment[], pitch: number, x0: number, withBlack: boolean, spacingError: number, worstPhase: number }

function findBarRun(segs: Segment[], matrix: MatrixName, notes: string[]): Run | null {
  const targets = expectedColours(0.75, matrix)
  let best: Run | null = null
  let sawOrder = false
  for (let i = 0; i + 7 <= segs.length; i++) {
    const run = segs.slice(i, i + 7)
    if (run[0]!.c > GREY_C) continue
    let ok = true
    let worstPhase = 0
    for (let k = 1; k < 7 && ok; k++) {
      const s = run[k]!
      const d = Math.abs(angleDiff(s.phase, targets[k - 1]!.phase))
      worstPhase = Math.max(worstPhase, d)
      if (s.c < 0.1 || d > PHASE_WINDOW) ok = false
      if (s.px.y >= run[k - 1]!.px.y) ok = false
    }
    if (!ok) continue
    sawOrder = true
    const pitch = (run[6]!.centre - run[0]!.centre) / 6
    let spacingError = 0
    for (let k = 0; k < 7; k++) spacingError = Math.max(spacingError, Math.abs(run[k]!.centre - (run[0]!.centre + k * pitch)) / pitch)
    // Bars' widths: the centres sit one pitch apart, and every bar is about one pitch wide.
    for (let k = 0; k < 7; k++) {
      const w = (run[k]!.x1 - run[k]!.x0) / pitch
      spacingError = Math.max(spacingError, 0.85 - w, w - 1.15)
    }
    const next = segs[i + 7]
    const withBlack = !!next && next.c < GREY_C && next.px.y < run[6]!.px.y && Math.abs(next.centre - (run[6]!.centre + pitch)) < 0.1 * pitch
    const cand: Run = { start: i, segs: run, pitch, x0: run[0]!.centre - pitch / 2, withBlack, spacingError, worstPhase }
    if (!best || cand.spacingError < best.spacingError) best = cand
  }
  if (!best) {
    notes.push(sawOrder
      ? 'no run of bars in the order grey, yellow, cyan, green, magenta, red, blue was found'
      : 'no run of seven flat stripes in the colour-bar order (grey, yellow, cyan, green, magenta, red, blue) with falling luma')
  }
  return best
}

/** Table values of the six coloured bars (and grey/white and black) at an amplitude. */
function expectedColours(amplitude: number, matrix: MatrixName) {
  return COLOUR_ORDER.map((name) => {
    const c = barRgb(name, amplitude)
    const p = rgbToYPbPr(c.r, c.g, c.b, matrix)
    return { name, yUnit: p.y, ...composite(p.pb, p.pr, matrix) }
  })
}

const codeToUnit = (c: number) => (c - 16) / 219

/** Measures a frame as colour bars; frames that do not fit a known pattern are not judged. */
export function measureBars(input: FrameInput, opts: { matrix?: MatrixName, spec?: DeliverySpec, tolerances?: BarsTolerances } = {}): BarsResult {
  const matrix = resolveMatrix(opts.matrix)
  const tolerances = opts.tolerances ?? barsTolerancesFor(opts.spec)
  const notes: string[] = []
  const empty = (): BarsResult => ({
    recognised: false, pattern: null, label: null, confidence: 0, notes, matrix, amplitude: null, scale: null, blackCode8: null, bars: [],
    blackIre: null, blackOffsetIre: null, setup: null, lumaGainPct: null, lumaGainErrorPct: null, chromaGainPct: null,
    chromaGainErrorPct: null, hueErrorDeg: null, pluge: null, verdict: null, reasons: [], tolerances, toleranceSource: BARS_TOLERANCE_SOURCE,
  })
  if (input.width < 64 || input.height < 32) {
    notes.push(`${input.width}×${input.height} is too small to hold a bars pattern`)
    return empty()
  }
  const pic = new Picture(input, matrix)
  const { width: W, height: H } = pic

  // The coloured bars fill at least the top 55 % of every known pattern; read them in a band
  // well inside that.
  const band = pic.profile(0.1 * H, 0.45 * H)
  const segs = segments(band, matrix, Math.max(4, Math.round(0.02 * W)))
  const run = findBarRun(segs, matrix, notes)
  if (!run) return empty()
  if (run.spacingError > 0.12) {
    notes.push(`the stripes are not bars of equal width and spacing (off by ${(100 * run.spacingError).toFixed(0)} % of a bar width)`)
    return empty()
  }

  // Horizontal layout: SD bars fill the width (seven bars, or eight with black); RP 219 puts
  // seven bars in the middle three quarters between two 40 % grey sides.
  const span7 = 7 * run.pitch / W
  let family: 'sd' | 'sd8' | 'hd' | null = null
  if (run.withBlack && Math.abs(8 * run.pitch / W - 1) < 0.04 && Math.abs(run.x0) < 0.02 * W) family = 'sd8'
  else if (Math.abs(span7 - 1) < 0.04 && Math.abs(run.x0) < 0.02 * W) family = 'sd'
  else if (Math.abs(span7 - 0.75) < 0.03 && Math.abs(run.x0 - W / 8) < 0.02 * W) {
    const left = segs[run.start - 1]; const right = segs[run.start + 7]
    const sideOk = (s: Segment | undefined) => !!s && s.c < GREY_C && s.x1 - s.x0 > 0.09 * W
    if (sideOk(left) && sideOk(right)) family = 'hd'
    else notes.push('the bars fill three quarters of the width but the 40 % grey sides of SMPTE RP 219 are missing')
  }
  else notes.push(`the seven bars span ${(100 * span7).toFixed(0)} % of the width from ${(100 * run.x0 / W).toFixed(0)} %; known patterns fill the width, or the middle 75 % (RP 219)`)
  if (!family) return empty()

  // Vertical layout: how far down the top bars reach, read at each bar's centre.
  const top = run.segs.map(s => s.px)
  const matches = (i: number) => {
    let n = 0
    for (let k = 0; k < 7; k++) {
      const x = Math.round(run.segs[k]!.centre)
      const d = Math.abs(pic.y[i]![x]! - top[k]!.y) + 224 * (Math.abs(pic.pb[i]![x]! - top[k]!.pb) + Math.abs(pic.pr[i]![x]! - top[k]!.pr))
      if (d < 4 * EDGE_CODES) n++
    }
    return n >= 6
  }
  let firstRow = -1; let lastRow = -1
  const mid = pic.at(0.3 * H)
  for (let i = mid; i >= 0 && matches(i); i--) firstRow = pic.rows[i]!
  for (let i = mid; i < pic.rows.length && matches(i); i++) lastRow = pic.rows[i]! + pic.step - 1
  if (firstRow < 0) {
    notes.push('the bars are not the same from row to row')
    return empty()
  }
  const topEnd = (lastRow + 1) / H
  if (firstRow > 0.03 * H) notes.push(`the bars start at row ${firstRow}, not at the top of the picture`)

  let pattern: BarsPattern | null = null
  if ((family === 'sd8' || family === 'sd') && topEnd > 0.95) pattern = 'sd-75-full' // amplitude settled below
  else if (family === 'sd' && topEnd > 0.62 && topEnd < 0.71) pattern = 'sd-75-split'
  else if (family === 'hd' && topEnd > 0.53 && topEnd < 0.62) pattern = 'hd-rp219'
  if (!pattern) {
    notes.push(`the bars end ${(100 * topEnd).toFixed(0)} % of the way down; known patterns end at 100 % (full field), 67 % (split field) or 58 % (RP 219)`)
    return empty()
  }

  // Sample the central half of each bar, over the middle 80 % of its height.
  const ry0 = firstRow + Math.round(0.1 * (lastRow - firstRow)); const ry1 = lastRow - Math.round(0.1 * (lastRow - firstRow)) + 1
  const regionOf = (centre: number, pitch: number, y0: number, y1: number): SampleRegion => ({
    x0: Math.max(0, Math.round(centre - pitch / 4)), x1: Math.min(W, Math.round(centre + pitch / 4)), y0, y1,
  })
  const topSamples = run.segs.map(s => ({ reg: regionOf(s.centre, run.pitch, ry0, ry1), ...pic.sample(regionOf(s.centre, run.pitch, ry0, ry1)) }))

  // Amplitude: the coloured bars' luma and chroma against the 75 % and 100 % tables.
  const fitOf = (amp: number) => {
    const e = expectedColours(amp, matrix)
    // Yellow − blue luma (free of any black offset) and every bar's chroma amplitude.
    const dm = codeToUnit(topSamples[1]!.y) - codeToUnit(topSamples[6]!.y)
    let s = Math.log(Math.max(1e-3, dm) / (e[0]!.yUnit - e[5]!.yUnit)) ** 2
    e.forEach((t, k) => {
      const m = topSamples[k + 1]!
      s += Math.log(Math.max(1e-3, composite(m.pb, m.pr, matrix).c) / t.c) ** 2 / 6
    })
    return s
  }
  const amp = fitOf(0.75) <= fitOf(1) ? 0.75 : 1
  if (pattern === 'sd-75-full' && amp === 1) pattern = 'sd-100-full'
  if (pattern !== 'sd-75-full' && pattern !== 'sd-100-full' && amp === 1) {
    notes.push('split-field and RP 219 bars carry 75 % colours; these are near 100 %')
    return empty()
  }

  // Extra rows of the split field and RP 219 patterns, and the black they carry.
  let blackSample: { reg: SampleRegion, y: number, pb: number, pr: number, spread: number } | null = null
  let pluge: PlugeStep[] | null = null
  if (family === 'sd8') {
    const s = run.segs.length === 7 ? segs[run.start + 7]! : null
    if (s) {
      const reg = regionOf(s.centre, run.pitch, ry0, ry1)
      blackSample = { reg, ...pic.sample(reg) }
    }
  }
  if (pattern === 'sd-75-split') {
    // Reverse-blue row: blue, black, magenta, black, cyan, black, grey under the seven bars.
    const rowY = Math.min(H - 1, lastRow + Math.round(0.04 * H))
    const i = pic.at(rowY)
    const want: Array<BarName | 'grey' | 'black'> = ['blue', 'black', 'magenta', 'black', 'cyan', 'black', 'grey']
    let bad = 0
    want.forEach((w, k) => {
      const x = Math.round(run.segs[k]!.centre)
      const px = { y: pic.y[i]![x]!, pb: pic.pb[i]![x]!, pr: pic.pr[i]![x]! }
      const c = composite(px.pb, px.pr, matrix)
      if (w === 'black') { if (c.c > GREY_C || px.y > topSamples[6]!.y) bad++ }
      else if (w === 'grey') { if (c.c > GREY_C || Math.abs(px.y - topSamples[0]!.y) > 8) bad++ }
      else {
        const t = expectedColours(0.75, matrix).find(e => e.name === w)!
        if (c.c < 0.1 || Math.abs(angleDiff(c.phase, t.phase)) > PHASE_WINDOW) bad++
      }
    })
    if (bad) {
      notes.push('the bars end two thirds of the way down but the row below is not the reverse-blue row of the split-field pattern')
      return empty()
    }
    const revEnd = Math.round(0.75 * H)
    pluge = findPluge(pic, Math.round(0.8 * H), Math.round(0.97 * H), [-1, 0, 1], ['below black', 'black', 'above black'], matrix)
    if (pluge) {
      // The PLUGE's middle stripe is the pattern's reference black.
      const b = pluge[1]!
      blackSample = { reg: b.region, ...pic.sample(b.region) }
    }
    else {
      notes.push('no PLUGE found in the bottom row; black read from the reverse-blue row')
      const bx = Math.round(run.segs[1]!.centre)
      const reg = { x0: Math.round(bx - run.pitch / 4), x1: Math.round(bx + run.pitch / 4), y0: lastRow + 2 + Math.round(0.01 * H), y1: Math.max(lastRow + 3 + Math.round(0.01 * H), revEnd - Math.round(0.01 * H)) }
      blackSample = { reg, ...pic.sample(reg) }
    }
  }
  if (pattern === 'hd-rp219') {
    if (matrix !== '709') {
      // RP 219 bars are coded with the BT.709 matrix whatever the reel says.
      const again = measureBars(input, { ...opts, matrix: '709', tolerances })
      again.notes.unshift('SMPTE RP 219 bars are BT.709-coded: measured with the BT.709 matrix, not the reel\'s BT.601')
      return again
    }
    pluge = findPluge(pic, Math.round(0.8 * H), Math.round(0.97 * H), [-1, 0, 1, 0, 1], ['−2 %', 'black', '+2 %', 'black', '+4 %'], matrix)
    if (!pluge) {
      notes.push('no PLUGE (−2 %, 0, +2 %, 0, +4 %) found in the bottom row of the RP 219 pattern')
      return empty()
    }
    const b = pluge[1]!
    blackSample = { reg: b.region, ...pic.sample(b.region) }
  }

  // Figures per bar against the table.
  const expected = expectedColours(amp, matrix)
  // The first bar is 75 % grey in 75 % patterns; a full-field 75 % pattern may open with 100 % white (100/0/75/0).
  const gainGuess = (codeToUnit(topSamples[1]!.y) - codeToUnit(topSamples[6]!.y)) / (expected[0]!.yUnit - expected[5]!.yUnit)
  const firstAboveYellow = (codeToUnit(topSamples[0]!.y) - codeToUnit(topSamples[1]!.y)) / gainGuess
  const firstUnit = amp === 1 || firstAboveYellow > (1 + 0.75) / 2 - expected[0]!.yUnit ? 1 : 0.75
  const firstName: 'white' | 'grey' = firstUnit === 1 ? 'white' : 'grey'
  const points: Array<{ name: BarName | 'grey', sample: typeof topSamples[number], eUnit: number, eu: number, ev: number, ec: number, ephase: number | null }> = [
    { name: firstName, sample: topSamples[0]!, eUnit: firstUnit, eu: 0, ev: 0, ec: 0, ephase: null },
    ...expected.map((e, k) => ({ name: e.name, sample: topSamples[k + 1]!, eUnit: e.yUnit, eu: e.u, ev: e.v, ec: e.c, ephase: e.phase })),
  ]
  if (blackSample) points.push({ name: 'black', sample: blackSample, eUnit: 0, eu: 0, ev: 0, ec: 0, ephase: null })

  // Setup. BT.601 codes black at 16 and an NTSC encoder adds the 7.5 IRE pedestal, so bars
  // coded per BT.801 read as SMPTE EG 1 on the engine's setup scale (16 ↔ 7.5 IRE). A file whose
  // codes carry the pedestal themselves (black near code 32: an NTSC source digitised without
  // removing setup) reads as EG 1 on the no-setup scale (16 ↔ 0 IRE) instead.
  const blackCode8 = blackSample ? blackSample.y : (() => {
    // No black in the pattern: extrapolate the bars' luma to Y' = 0.
    const xs = points.map(p => p.eUnit); const ys = points.map(p => p.sample.y)
    const mx = xs.reduce((a, b) => a + b, 0) / xs.length; const my = ys.reduce((a, b) => a + b, 0) / ys.length
    let sxy = 0; let sxx = 0
    xs.forEach((x, k) => { sxy += (x - mx) * (ys[k]! - my); sxx += (x - mx) ** 2 })
    return my - (sxy / sxx) * mx
  })()
  const blackIre0 = 100 * codeToUnit(blackCode8)
  const setup: 'present' | 'absent' = blackIre0 >= SETUP_IRE / 2 ? 'present' : 'absent'
  const scale: 'ire' | 'ire0' = setup === 'present' ? 'ire0' : 'ire'
  const readIre = (code8: number) => scale === 'ire0' ? 100 * codeToUnit(code8) : code8ToIre(code8)
  const ppPerC = scale === 'ire0' ? 200 : 2 * SETUP_SPAN_IRE
  // SMPTE EG 1: level = 7.5 + 92.5·Y' IRE, chroma p-p = 2·92.5·C IRE.
  const tableIre = (yUnit: number) => SETUP_IRE + SETUP_SPAN_IRE * yUnit
  const tableCode8 = (ire: number) => scale === 'ire0' ? 16 + 219 * ire / 100 : ireToCode8(ire)

  // Luma: measured = black + gain · (table − table black), least squares over every bar.
  const xs = points.map(p => tableIre(p.eUnit) - SETUP_IRE); const ys = points.map(p => readIre(p.sample.y))
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length; const my = ys.reduce((a, b) => a + b, 0) / ys.length
  let sxy = 0; let sxx = 0
  xs.forEach((x, k) => { sxy += (x - mx) * (ys[k]! - my); sxx += (x - mx) ** 2 })
  const lumaGain = sxy / sxx
  const blackIre = readIre(blackCode8)
  const blackOffsetIre = blackIre - SETUP_IRE

  // Chroma: measured U/V = gain · e^{iθ} · table U/V (complex least squares over the coloured bars).
  let re = 0; let im = 0; let ee = 0
  const cK = ppPerC / (2 * SETUP_SPAN_IRE)
  const figs: BarFigure[] = points.map((p) => {
    const ce = composite(p.sample.pb, p.sample.pr, matrix)
    const mu = ce.u * cK; const mv = ce.v * cK; const mc = ce.c * cK
    if (p.ec > 0) {
      re += mu * p.eu + mv * p.ev
      im += mv * p.eu - mu * p.ev
      ee += p.ec * p.ec
    }
    const lumaCode8 = p.sample.y
    const expectedIre = tableIre(p.eUnit)
    const expectedCode8 = tableCode8(expectedIre)
    const lumaIre = readIre(lumaCode8)
    const chromaPp = 2 * SETUP_SPAN_IRE * mc
    const eChromaPp = 2 * SETUP_SPAN_IRE * p.ec
    const phase = p.ec > 0 ? ce.phase : null
    return {
      name: p.name, region: p.sample.reg, lumaCode8, expectedCode8, lumaIre, expectedIre, lumaErrorIre: lumaIre - expectedIre,
      u: ce.u, v: ce.v, chromaPpIre: chromaPp, expectedChromaPpIre: eChromaPp, chromaErrorIre: chromaPp - eChromaPp,
      chromaPct: p.ec > 0 ? 100 * mc / p.ec : null,
      phaseDeg: phase, expectedPhaseDeg: p.ephase, phaseErrorDeg: phase === null ? null : angleDiff(phase, p.ephase!),
      spreadCode8: p.sample.spread,
    }
  })
  const chromaGain = Math.hypot(re, im) / ee
  const hueErrorDeg = Math.atan2(im, re) * 180 / Math.PI

  // Confidence: geometry, flatness and how near the hues are to the table.
  let confidence = 1
  confidence *= 1 - Math.min(1, run.spacingError / 0.12) * 0.3
  const worstSpread = Math.max(...figs.map(f => f.spreadCode8))
  if (worstSpread > 6) {
    notes.push(`a bar is not flat (luma spread ${worstSpread.toFixed(1)} codes in its sampled region)`)
    confidence *= 0.5
  }
  if (run.worstPhase > 12) {
    notes.push(`a bar's hue is ${run.worstPhase.toFixed(0)}° from the table`)
    confidence *= 0.85
  }
  if (firstRow > 0.03 * H) confidence *= 0.8
  if (confidence < 0.6) {
    notes.push(`confidence ${confidence.toFixed(2)} is too low to judge the frame as bars`)
    return { ...empty(), confidence }
  }

  const reasons: BarsReason[] = []
  const tol = tolerances
  const sgn = (v: number, d = 1) => `${v >= 0 ? '+' : '−'}${Math.abs(v).toFixed(d)}`
  if (Math.abs(blackOffsetIre) > tol.lumaIre) reasons.push({ check: 'black', value: blackOffsetIre, tolerance: tol.lumaIre, unit: 'IRE', message: `Black level ${sgn(blackOffsetIre)} IRE off the table (±${tol.lumaIre} IRE)` })
  for (const f of figs) {
    if (Math.abs(f.lumaErrorIre) > tol.lumaIre && f.name !== 'black') reasons.push({ check: `luma-${f.name}`, value: f.lumaErrorIre, tolerance: tol.lumaIre, unit: 'IRE', message: `${f.name} bar luma ${sgn(f.lumaErrorIre)} IRE off the table (±${tol.lumaIre} IRE)` })
  }
  const chromaGainErrorPct = 100 * (chromaGain - 1)
  if (Math.abs(chromaGainErrorPct) > tol.chromaGainPct) reasons.push({ check: 'chroma-gain', value: chromaGainErrorPct, tolerance: tol.chromaGainPct, unit: '%', message: `Chroma gain ${sgn(chromaGainErrorPct)} % (±${tol.chromaGainPct} %)` })
  if (Math.abs(hueErrorDeg) > tol.hueDeg) reasons.push({ check: 'hue', value: hueErrorDeg, tolerance: tol.hueDeg, unit: '°', message: `Hue (phase) error ${sgn(hueErrorDeg)}° (±${tol.hueDeg}°)` })
  if (tol.setup !== 'either' && tol.setup !== setup) {
    reasons.push({ check: 'setup', value: blackIre0, tolerance: 0, unit: 'IRE', message: tol.setup === 'absent'
      ? `Setup carried in the codes: black at code ${blackCode8.toFixed(1)} (${blackIre0.toFixed(1)} IRE above digital black); the delivery expects black at code 16`
      : `No setup in the codes: black at code ${blackCode8.toFixed(1)}; the delivery expects the 7.5 IRE pedestal in the file` })
  }

  return {
    recognised: true, pattern, label: BARS_PATTERN_LABELS[pattern], confidence, notes, matrix,
    amplitude: amp === 1 ? 100 : 75, scale, bars: figs, blackCode8,
    blackIre, blackOffsetIre, setup, lumaGainPct: 100 * lumaGain, lumaGainErrorPct: 100 * (lumaGain - 1),
    chromaGainPct: 100 * chromaGain, chromaGainErrorPct, hueErrorDeg, pluge,
    verdict: reasons.length ? 'fail' : 'pass', reasons, tolerances, toleranceSource: BARS_TOLERANCE_SOURCE,
  }
}

/**
 * PLUGE: a run of narrow near-black stripes in the bottom rows whose steps have the given signs
 * against the black between them (SD: below, at, above black; RP 219: −2 %, 0, +2 %, 0, +4 %).
 */
function findPluge(pic: Picture, y0: number, y1: number, signs: number[], labels: string[], matrix: MatrixName): PlugeStep[] | null {
  const segs = segments(pic.profile(y0, y1), matrix, Math.max(3, Math.round(0.015 * pic.width)))
  const n = signs.length
  for (let i = 0; i + n <= segs.length; i++) {
    const run = segs.slice(i, i + n)
    const blackIdx = signs.indexOf(0)
    const black = run[blackIdx]!.px.y
    // Near black: within 12 codes (≈ 5 IRE) and achromatic.
    const ok = run.every((s, k) => s.c < GREY_C && Math.abs(s.px.y - black) < 12 && Math.sign(Math.round((s.px.y - black) * 4) / 4) === signs[k])
    if (!ok || black > 40) continue
    const ry0 = y0 + Math.round(0.1 * (y1 - y0)); const ry1 = y1 - Math.round(0.1 * (y1 - y0))
    return run.map((s, k) => {
      const w = s.x1 - s.x0
      const region = { x0: Math.round(s.x0 + w / 4), x1: Math.max(Math.round(s.x0 + w / 4) + 1, Math.round(s.x1 - w / 4)), y0: ry0, y1: ry1 }
      const m = pic.sample(region)
      const ire = code8ToIre(m.y)
      return { label: labels[k]!, region, lumaIre: ire, relativeIre: ire - code8ToIre(black) }
    })
  }
  return null
}
