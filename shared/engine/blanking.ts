// Blanking estimate of a full-raster SD capture: where the active picture starts and ends on
// each line, and which lines carry picture at all. Judged against the NTSC (System M) timing:
// horizontal blanking 10.9 ± 0.2 µs and at most 21 lines of vertical blanking per field
// (SMPTE 170M, clause numbers from memory); line period from the FCC line rate 15 734.264 Hz
// (47 CFR §73.682); 13.5 MHz luma sampling (ITU-R BT.601).
import { resolveMatrix } from './matrix'
import { makeRowBuffers, makeRowSource } from './decode'
import type { FrameInput, MatrixName } from './types'

export const SD_SAMPLE_RATE_MHZ = 13.5
/** 1 / 15 734.264 Hz (FCC 47 CFR §73.682) in µs. */
export const NTSC_LINE_US = 1e6 / 15734.264
export const NTSC_LINES_PER_FRAME = 525
export const H_BLANKING_MIN_US = 10.7
export const H_BLANKING_MAX_US = 11.1
export const V_BLANKING_MAX_LINES = 21
export const BLANKING_SOURCE = 'SMPTE 170M (memory): horizontal blanking 10.9 ± 0.2 µs, at most 21 lines of vertical blanking per field'
/** Heights of a full-raster 525-line capture at 13.5 MHz (486 as analogue NTSC, 487 as BT.656). */
export const SD_RASTER_HEIGHTS = [486, 487] as const

export const samplesToUs = (samples: number): number => samples / SD_SAMPLE_RATE_MHZ
export const usToSamples = (us: number): number => us * SD_SAMPLE_RATE_MHZ

export interface BlankingReason { check: 'h-blanking' | 'v-blanking', value: number, unit: string, message: string }

export interface BlankingResult {
  applicable: boolean
  notes: string[]
  /** Where the active picture starts (left) and ends (right) on each line, in samples; null on a line with none. */
  leftEdges: Array<number | null>
  rightEdges: Array<number | null>
  /** The picture's edges over the frame (samples, fractional: left is the first, right one past the last). */
  left: number | null
  right: number | null
  /** The picture fills the digital line on that side, so the blanking there is not seen. */
  leftHidden: boolean
  rightHidden: boolean
  activeUs: number | null
  /** Line period minus the active picture; an upper bound when an edge is hidden. */
  hBlankingUs: number | null
  hBlankingExact: boolean
  firstActiveLine: number | null
  lastActiveLine: number | null
  activeLines: number | null
  /** (525 − active lines) / 2: the lines of each field not carrying picture. */
  vBlankingLinesPerField: number | null
  blankingLevelCode8: number | null
  verdict: 'pass' | 'fail' | 'unknown' | null
  reasons: BlankingReason[]
  source: string
}

// A sample departs from blanking by more than this (8-bit codes of Y, or of Cb/Cr).
const DEPART = 3

export function measureBlanking(input: FrameInput, opts: { matrix?: MatrixName } = {}): BlankingResult {
  const notes: string[] = []
  const res: BlankingResult = {
    applicable: false, notes, leftEdges: [], rightEdges: [], left: null, right: null, leftHidden: false, rightHidden: false,
    activeUs: null, hBlankingUs: null, hBlankingExact: false, firstActiveLine: null, lastActiveLine: null, activeLines: null,
    vBlankingLinesPerField: null, blankingLevelCode8: null, verdict: null, reasons: [], source: BLANKING_SOURCE,
  }
  if (input.width !== 720 || !(SD_RASTER_HEIGHTS as readonly number[]).includes(input.height)) {
    notes.push(`blanking is estimated on full-raster SD captures (720 × 486 or 487 at 13.5 MHz); this frame is ${input.width} × ${input.height}`)
    return res
  }
  res.applicable = true
  const src = makeRowSource(input, resolveMatrix(opts.matrix))
  const W = src.width; const H = src.height
  const buf = makeRowBuffers(W)
  const ys: Float64Array[] = []; const cs: Float64Array[] = []
  const outerL: number[] = []; const outerR: number[] = []
  for (let r = 0; r < H; r++) {
    src.readRow(r, buf)
    const y = Float64Array.from(buf.y)
    const c = new Float64Array(W)
    for (let x = 0; x < W; x++) c[x] = 224 * Math.max(Math.abs(buf.pb[x]!), Math.abs(buf.pr[x]!))
    ys.push(y); cs.push(c)
    outerL.push(y[0]!); outerR.push(y[W - 1]!)
  }
  // Blanking level: what the raster's outermost samples hold on most lines, on each side; it must
  // be at or below black, else the picture reaches that end of the digital line.
  const med = (a: number[]) => a.sort((p, q) => p - q)[Math.floor(a.length / 2)]!
  const mL = med(outerL); const mR = med(outerR)
  const blankL = mL <= 16 + DEPART; const blankR = mR <= 16 + DEPART
  const edgeBlank = blankL || blankR
  // Without blanking at the edges, lines are told from digital blanking (Y 16, Cb Cr 128; BT.601).
  const b = blankL ? mL : blankR ? mR : 16
  const blank = (r: number, x: number) => Math.abs(ys[r]![x]! - b) <= DEPART && cs[r]![x]! <= DEPART
  res.blankingLevelCode8 = edgeBlank ? b : null

  let first = -1; let last = -1
  for (let r = 0; r < H; r++) {
    let l: number | null = null; let rt: number | null = null
    let x0 = 0
    while (x0 < W && blank(r, x0)) x0++
    if (x0 < W) {
      let x1 = W - 1
      while (x1 > x0 && blank(r, x1)) x1--
      l = subSample(ys[r]!, x0, +1, b)
      rt = x1 + 1 - (1 - fraction(ys[r]!, x1, -1, b))
      if (first < 0) first = r
      last = r
    }
    res.leftEdges.push(l === null ? null : Math.round(l * 100) / 100)
    res.rightEdges.push(rt === null ? null : Math.round(rt * 100) / 100)
  }
  if (first < 0) {
    notes.push('every line is at the blanking level: no picture to measure')
    res.verdict = 'unknown'
    return res
  }
  res.firstActiveLine = first
  res.lastActiveLine = last
  res.activeLines = last - first + 1
  res.vBlankingLinesPerField = (NTSC_LINES_PER_FRAME - res.activeLines) / 2

  // Over the frame: lines whose picture is dark at its edge start late, so the earliest quarter
  // of left edges (and latest quarter of right edges) marks where the active picture begins.
  const lefts = res.leftEdges.filter((v): v is number => v !== null).sort((a, b) => a - b)
  const rights = res.rightEdges.filter((v): v is number => v !== null).sort((a, b) => b - a)
  const left = lefts[Math.floor(0.25 * (lefts.length - 1))]!
  const right = rights[Math.floor(0.25 * (rights.length - 1))]!
  res.left = left
  res.right = right
  res.leftHidden = !blankL || left < 0.5
  res.rightHidden = !blankR || right > W - 0.5
  res.activeUs = samplesToUs(right - left)
  res.hBlankingUs = NTSC_LINE_US - res.activeUs
  res.hBlankingExact = !res.leftHidden && !res.rightHidden
  if (!res.hBlankingExact) {
    notes.push(`the picture reaches the ${res.leftHidden && res.rightHidden ? 'both ends' : res.leftHidden ? 'left end' : 'right end'} of the 720-sample line, so the blanking there is hidden: ${res.hBlankingUs.toFixed(2)} µs is an upper bound`)
  }

  const h = res.hBlankingUs
  if (res.leftHidden && res.rightHidden) {
    // A picture made digitally fills the 720-sample line; nothing about the blanking can be told.
    res.notes.push('no blanking is seen on either side (a picture made digitally fills the 720-sample line), so the horizontal blanking is not judged')
  }
  else if (res.hBlankingExact && (h < H_BLANKING_MIN_US || h > H_BLANKING_MAX_US)) {
    res.reasons.push({ check: 'h-blanking', value: h, unit: 'µs', message: `Horizontal blanking ${h.toFixed(2)} µs, outside ${H_BLANKING_MIN_US}–${H_BLANKING_MAX_US} µs (${h > H_BLANKING_MAX_US ? 'picture too narrow' : 'picture too wide'})` })
  }
  else if (!res.hBlankingExact && h < H_BLANKING_MIN_US) {
    res.reasons.push({ check: 'h-blanking', value: h, unit: 'µs', message: `Horizontal blanking at most ${h.toFixed(2)} µs, below ${H_BLANKING_MIN_US} µs (picture too wide)` })
  }
  const v = res.vBlankingLinesPerField
  if (v > V_BLANKING_MAX_LINES) {
    res.reasons.push({ check: 'v-blanking', value: v, unit: 'lines', message: `Vertical blanking ${v} lines per field, more than ${V_BLANKING_MAX_LINES}` })
  }
  res.verdict = res.reasons.length ? 'fail' : res.hBlankingExact ? 'pass' : 'unknown'
  return res
}

/** Share (0..1) of sample x covered by picture, from its level between blanking and the picture beside it. */
function fraction(y: Float64Array, x: number, dir: 1 | -1, b: number): number {
  const inside = y[Math.min(y.length - 1, Math.max(0, x + 2 * dir))]!
  if (Math.abs(inside - b) < 4 * DEPART) return 1 // too dark beside the edge to tell a partial sample
  return Math.min(1, Math.max(0, (y[x]! - b) / (inside - b)))
}

function subSample(y: Float64Array, x0: number, dir: 1, b: number): number {
  return x0 + (1 - fraction(y, x0, dir, b))
}
