// The line-up checks as JSON (`bars`, `blanking`, `match`): the field names of
// `npm run analyse -- --json`, stored with the analysis and returned by GET /api/frames/:id.
// Their findings join the frame's verdict reasons, so a failing bars frame is flagged, decided
// and printed on the sheet like any failing frame.
import { matchBars, measureBars, measureBlanking } from '../engine'
import type { BarsResult, BarsTolerances, BlankingResult, DeliverySpec, FrameInput, MatchResult, MatrixName, VerdictReason } from '../engine'
import type { AnalysisJson } from './report'

const r3 = (v: number) => Math.round(v * 1000) / 1000
const n3 = (v: number | null) => v === null ? null : r3(v)

export function barsJson(b: BarsResult) {
  return {
    recognised: b.recognised, pattern: b.pattern, label: b.label, confidence: r3(b.confidence), notes: b.notes,
    matrix: b.matrix, amplitude: b.amplitude, scale: b.scale,
    bars: b.bars.map(f => ({
      name: f.name, region: f.region,
      lumaCode8: r3(f.lumaCode8), expectedCode8: r3(f.expectedCode8),
      lumaIre: r3(f.lumaIre), expectedIre: r3(f.expectedIre), lumaErrorIre: r3(f.lumaErrorIre),
      u: r3(f.u * 1000) / 1000, v: r3(f.v * 1000) / 1000,
      chromaPpIre: r3(f.chromaPpIre), expectedChromaPpIre: r3(f.expectedChromaPpIre), chromaErrorIre: r3(f.chromaErrorIre),
      chromaPct: n3(f.chromaPct), phaseDeg: n3(f.phaseDeg), expectedPhaseDeg: n3(f.expectedPhaseDeg), phaseErrorDeg: n3(f.phaseErrorDeg),
      spreadCode8: r3(f.spreadCode8),
    })),
    blackCode8: n3(b.blackCode8), blackIre: n3(b.blackIre), blackOffsetIre: n3(b.blackOffsetIre), setup: b.setup,
    lumaGainPct: n3(b.lumaGainPct), lumaGainErrorPct: n3(b.lumaGainErrorPct),
    chromaGainPct: n3(b.chromaGainPct), chromaGainErrorPct: n3(b.chromaGainErrorPct), hueErrorDeg: n3(b.hueErrorDeg),
    pluge: b.pluge?.map(p => ({ label: p.label, region: p.region, lumaIre: r3(p.lumaIre), relativeIre: r3(p.relativeIre) })) ?? null,
    verdict: b.verdict,
    reasons: b.reasons.map(x => ({ ...x, value: r3(x.value) })),
    tolerances: b.tolerances, toleranceSource: b.toleranceSource,
  }
}
export type BarsJson = ReturnType<typeof barsJson>

export function blankingJson(b: BlankingResult) {
  return {
    applicable: b.applicable, notes: b.notes,
    left: n3(b.left), right: n3(b.right), leftHidden: b.leftHidden, rightHidden: b.rightHidden,
    activeUs: n3(b.activeUs), hBlankingUs: n3(b.hBlankingUs), hBlankingExact: b.hBlankingExact,
    firstActiveLine: b.firstActiveLine, lastActiveLine: b.lastActiveLine, activeLines: b.activeLines,
    vBlankingLinesPerField: b.vBlankingLinesPerField, blankingLevelCode8: n3(b.blankingLevelCode8),
    verdict: b.verdict, reasons: b.reasons.map(x => ({ ...x, value: r3(x.value) })), source: b.source,
    leftEdges: b.leftEdges, rightEdges: b.rightEdges,
  }
}
export type BlankingJson = ReturnType<typeof blankingJson>

export interface MatchReference { frameId: number, frameName: string, reelId: number, reelName: string }

export function matchJson(m: MatchResult, ref: MatchReference) {
  return {
    reference: ref,
    levelOffsetIre: r3(m.levelOffsetIre), gainRatio: Math.round(m.gainRatio * 1e5) / 1e5, chromaGainPct: r3(m.chromaGainPct),
    hueOffsetDeg: r3(m.hueOffsetDeg), verdict: m.verdict, reasons: m.reasons.map(x => ({ ...x, value: r3(x.value) })), summary: m.summary,
  }
}
export type MatchJson = ReturnType<typeof matchJson>

export type LineupAnalysisJson = AnalysisJson & { bars: BarsJson, blanking: BlankingJson, match: MatchJson | null }

/** Measures both line-up checks of one frame. */
export function measureLineup(input: FrameInput, opts: { matrix?: MatrixName, spec?: DeliverySpec }) {
  return { bars: barsJson(measureBars(input, opts)), blanking: blankingJson(measureBlanking(input, opts)) }
}

const LINEUP_PREFIXES = ['bars-', 'blanking-', 'match-']
const isLineup = (r: { limit: string }) => LINEUP_PREFIXES.some(p => r.limit.startsWith(p))

function lineupReasons(bars: BarsJson, blanking: BlankingJson, match: MatchJson | null): VerdictReason[] {
  const out: VerdictReason[] = []
  for (const x of bars.reasons) out.push({ limit: `bars-${x.check}`, value: x.value, share: 0, severity: 'fail', unit: x.unit, threshold: x.tolerance, message: `Bars check: ${x.message}; tolerance ${bars.toleranceSource.split(':')[0]}` })
  for (const x of blanking.reasons) out.push({ limit: `blanking-${x.check === 'h-blanking' ? 'h' : 'v'}`, value: x.value, share: 0, severity: 'fail', unit: x.unit, threshold: x.check === 'h-blanking' ? (x.value > 11.1 ? 11.1 : 10.7) : 21, message: `Blanking: ${x.message} (${blanking.source})` })
  for (const x of match?.reasons ?? []) out.push({ limit: `match-${x.check}`, value: x.value, share: 0, severity: 'fail', unit: x.unit, threshold: x.tolerance, message: `Source match against ${match!.reference.reelName} / ${match!.reference.frameName}: ${x.message}` })
  return out
}

/** The analysis JSON with the line-up checks added, their findings among the verdict's reasons. */
export function withLineup(json: AnalysisJson, l: { bars: BarsJson, blanking: BlankingJson, match?: MatchJson | null }): LineupAnalysisJson {
  const match = l.match ?? null
  const reasons = [...json.reasons.filter(r => !isLineup(r)), ...lineupReasons(l.bars, l.blanking, match)]
  const verdict = reasons.some(r => r.severity === 'fail') ? 'fail' : reasons.length ? 'caution' : 'pass'
  return { ...json, verdict, reasons, bars: l.bars, blanking: l.blanking, match }
}

/** The stored JSON with its match against a (new) reference, or none; verdict and reasons follow. */
export function applyMatch(json: LineupAnalysisJson, reference: { bars: BarsJson, ref: MatchReference } | null, tol: BarsTolerances): LineupAnalysisJson {
  const m = reference && json.bars?.recognised && reference.ref.frameId !== undefined ? matchBars(reference.bars, json.bars, tol) : null
  const match = m && reference ? matchJson(m, reference.ref) : null
  const base = { ...json, reasons: json.reasons.filter(r => !r.limit.startsWith('match-')) }
  return withLineup(base, { bars: json.bars, blanking: json.blanking, match })
}

/** The line-up checks of one stored analysis in a few lines of text, for the pass/fail sheet. */
export function lineupLines(json: Partial<LineupAnalysisJson> | null | undefined): string[] {
  const out: string[] = []
  const b = json?.bars
  const sg = (v: number, d: number) => `${v >= 0 ? '+' : '−'}${Math.abs(v).toFixed(d)}`
  if (b?.recognised) {
    out.push(`Bars check: ${b.label} — black ${b.blackIre!.toFixed(2)} IRE (offset ${sg(b.blackOffsetIre!, 2)}), setup ${b.setup}, luma gain ${b.lumaGainPct!.toFixed(1)} %, chroma gain ${b.chromaGainPct!.toFixed(1)} %, hue ${sg(b.hueErrorDeg!, 1)}°${b.pluge ? `, PLUGE ${b.pluge.map(p => sg(p.relativeIre, 1)).join('/')} IRE` : ''}: ${b.verdict!.toUpperCase()} (tolerances common practice)`)
  }
  const m = json?.match
  if (m) out.push(`Source match against ${m.reference.reelName} / ${m.reference.frameName}: ${m.summary}: ${m.verdict.toUpperCase()}`)
  const k = json?.blanking
  if (k?.applicable && k.hBlankingUs !== null) {
    out.push(`Blanking: H ${k.hBlankingExact ? '' : 'at most '}${k.hBlankingUs.toFixed(2)} µs, V ${k.vBlankingLinesPerField} lines a field: ${k.verdict === 'unknown' ? 'H not judged' : k.verdict!.toUpperCase()} (SMPTE 170M, memory)`)
  }
  return out
}
