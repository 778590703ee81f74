// Figures for setting two frames side by side (camera A against camera B): black, white and
// mean luma from the stored statistics, mean hue and chroma from the stored Cb/Cr histograms.
// Plain TypeScript: the compare page runs it in the browser, tests run it in Node.
import { MATRICES, U_WEIGHT, V_WEIGHT } from '../engine/matrix'
import { SETUP_SPAN_IRE, toScale, type LevelScale } from '../engine/scales'
import type { MatrixName } from '../engine/types'

/** The histogram fields of GET /api/frames/:id (arrays after the JSON round trip). */
export interface ChromaHistograms {
  bins: number
  cb: ArrayLike<number>
  cr: ArrayLike<number>
}

export interface MeanChroma {
  /** Mean colour difference, −0.5…+0.5 (BT.601 §2.5 Pb, Pr). */
  meanPb: number
  meanPr: number
  /** The composite weighting of that mean (SMPTE 170M U, V on the Y' scale). */
  u: number
  v: number
  /** Peak-to-peak amplitude of the mean chroma vector, IRE on the 7.5-setup scale. */
  amplitudeIre: number
  /** atan2(V, U) in degrees 0…360 from the +(B'−Y') axis; null when the mean carries no colour. */
  hueDeg: number | null
}

// Below this (≈ 0.02 IRE p-p) the mean vector is rounding noise and its angle means nothing.
const HUE_FLOOR = 1e-4

function meanCode(h: ArrayLike<number>): { mean: number, count: number } {
  let n = 0
  let sum = 0
  for (let i = 0; i < h.length; i++) {
    const c = h[i]!
    n += c
    sum += c * i
  }
  return { mean: n ? sum / n : NaN, count: n }
}

/**
 * The mean chroma of a frame from its Cb and Cr histograms. The mean is linear, so the mean
 * of each colour-difference histogram on its own gives the mean (Pb, Pr) vector exactly;
 * its angle is the frame's average hue, and its length how far that average leans from grey.
 * Bin i of a `bins`-bin histogram is code i at depth log2(bins) (ITU-R BT.601-7 Table 3 coding ranges — memory).
 */
export function meanChroma(h: ChromaHistograms, matrix: MatrixName = '601'): MeanChroma | null {
  const depth = Math.round(Math.log2(h.bins))
  if (!Number.isFinite(depth) || 2 ** depth !== h.bins || depth < 8) throw new Error(`a histogram needs a power-of-two bin count ≥ 256, not ${h.bins}`)
  const cb = meanCode(h.cb)
  const cr = meanCode(h.cr)
  if (!cb.count || !cr.count) return null
  const k = 2 ** (depth - 8)
  const meanPb = (cb.mean / k - 128) / 224
  const meanPr = (cr.mean / k - 128) / 224
  const m = MATRICES[matrix]
  // B'−Y' = cbDiv·Pb and R'−Y' = crDiv·Pr, then the SMPTE 170M weights (memory).
  const u = U_WEIGHT * m.cbDiv * meanPb
  const v = V_WEIGHT * m.crDiv * meanPr
  const c = Math.hypot(u, v)
  let hueDeg: number | null = null
  if (c > HUE_FLOOR) {
    hueDeg = Math.atan2(v, u) * 180 / Math.PI
    if (hueDeg < 0) hueDeg += 360
  }
  return { meanPb, meanPr, u, v, amplitudeIre: 2 * SETUP_SPAN_IRE * c, hueDeg }
}

/** The part of a frame's analysis the comparison reads. */
export interface ComparableFrame {
  matrix: MatrixName
  /** 8-bit-equivalent studio-range codes (16 black, 235 white). */
  luma: { min: number, max: number, mean: number }
  histograms: ChromaHistograms
}

export interface LevelDifference {
  a: number
  b: number
  /** b − a in the same scale. */
  diff: number
}

export interface HueDifference {
  a: number | null
  b: number | null
  /** b − a turned the short way round, −180…+180; null when either frame is grey on average. */
  diff: number | null
}

export interface FrameComparison {
  scale: LevelScale
  black: LevelDifference
  white: LevelDifference
  mean: LevelDifference
  hue: HueDifference
  /** Amplitude of the mean chroma vector, IRE p-p on the setup scale. */
  chroma: LevelDifference
}

function level(a: number, b: number, scale: LevelScale): LevelDifference {
  const va = toScale(a, scale)
  const vb = toScale(b, scale)
  return { a: va, b: vb, diff: vb - va }
}

/** Shortest signed turn from angle a to angle b, in degrees. */
export function hueTurn(a: number, b: number): number {
  const d = ((b - a) % 360 + 540) % 360 - 180
  return d === -180 ? 180 : d
}

/** Frame b measured against frame a: black level (luma min), peak white (luma max), mean luma, mean hue. */
export function compareFrames(a: ComparableFrame, b: ComparableFrame, scale: LevelScale): FrameComparison {
  const ca = meanChroma(a.histograms, a.matrix)
  const cb = meanChroma(b.histograms, b.matrix)
  const hueA = ca?.hueDeg ?? null
  const hueB = cb?.hueDeg ?? null
  const ampA = ca?.amplitudeIre ?? 0
  const ampB = cb?.amplitudeIre ?? 0
  return {
    scale,
    black: level(a.luma.min, b.luma.min, scale),
    white: level(a.luma.max, b.luma.max, scale),
    mean: level(a.luma.mean, b.luma.mean, scale),
    hue: { a: hueA, b: hueB, diff: hueA === null || hueB === null ? null : hueTurn(hueA, hueB) },
    chroma: { a: ampA, b: ampB, diff: ampB - ampA },
  }
}

