// The analysis as JSON: the field names of `npm run analyse -- --json`, which scripts read.
// The worker stores exactly this, and GET /api/frames/:id returns it.
import { ENGINE_VERSION } from '../engine'
import type { FrameAnalysis, Histograms, LinePlot } from '../engine/types'

const r3 = (v: number) => Math.round(v * 1000) / 1000
const r6 = (v: number) => Math.round(v * 1e6) / 1e6
const round = <T extends object>(o: T, f = r3): T =>
  Object.fromEntries(Object.entries(o).map(([k, v]) => [k, f(v as number)])) as T

export function analysisJson(a: FrameAnalysis, specName: string) {
  return {
    engineVersion: ENGINE_VERSION,
    width: a.width, height: a.height, bitDepth: a.bitDepth, matrix: a.matrix, range: a.range,
    luma: round(a.luma),
    lumaIre: round(a.lumaIre),
    compositeIre: round(a.compositeIre),
    chroma: round(a.chroma),
    shares: round(a.shares, r6),
    spec: specName,
    verdict: a.verdict,
    reasons: reasonsJson(a.reasons),
  }
}

export function reasonsJson(reasons: FrameAnalysis['reasons']) {
  return reasons.map((r) => ({ ...r, value: r3(r.value), share: r6(r.share) }))
}

export type AnalysisJson = ReturnType<typeof analysisJson>

export function lineJson(line: LinePlot) {
  return {
    index: line.index,
    samples: line.samples.map((s) => ({
      x: s.x, us: r3(s.us), lumaIre: r3(s.lumaIre), compMinIre: r3(s.compMinIre), compMaxIre: r3(s.compMaxIre),
      chromaPpIre: r3(s.chromaPpIre), phaseDeg: s.phaseDeg === null ? null : r3(s.phaseDeg), r: r6(s.r), g: r6(s.g), b: r6(s.b),
    })),
  }
}

/** The histograms as stored with the analysis and drawn by the frame page (no level distributions). */
export function histogramsJson(h: Histograms) {
  return { bins: h.bins, rgbCoding: h.rgbCoding, y: [...h.y], cb: [...h.cb], cr: [...h.cr], r: [...h.r], g: [...h.g], b: [...h.b] }
}

export type HistogramsJson = ReturnType<typeof histogramsJson>
