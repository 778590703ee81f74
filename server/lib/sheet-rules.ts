// The pass/fail sheet's rules as plain functions over rows: what blocks a sign-off, how the
// overall result is reached, and the CSV records. Shared by the routes, the worker and the
// unit tests, so the page, the PDF and the CSV can never disagree.
import type { Decision } from '../../shared/utils/decisions'
import type { FrameStatus } from '../../shared/utils/uploads'
import { NO_TIMECODE } from '../../shared/utils/timecode'
import type { Verdict } from '../../shared/engine/types'

export interface SheetReason {
  limit: string
  message: string
  severity: 'caution' | 'fail'
}

/** One frame of a reel as the sheet shows it (levels in IRE on the 7.5-setup scale). */
export interface SheetRow {
  frameId: number
  seq: number
  name: string
  timecode: string | null
  status: FrameStatus
  failReason: string | null
  verdict: Verdict | null
  lumaMinIre: number | null
  lumaMaxIre: number | null
  compMaxIre: number | null
  /** Largest share of the picture beyond any range test (0..1). */
  outShare: number | null
  specName: string | null
  specVersion: number | null
  engineVersion: string | null
  reasons: SheetReason[]
  /** Bars check, source match and blanking of the frame, one line each (empty when none applies). */
  lineup?: string[]
  decision: Decision | null
  note: string
  decidedBy: string | null
  decidedAt: Date | null
  /** Every decision made on the frame, oldest first (the standing one is the last unless cleared). */
  history?: HistoryStep[]
}

export interface HistoryStep {
  at: Date
  decision: Decision | 'cleared'
  note: string
  by: string | null
}

/** "2026-03-01 10:20 UTC accepted by Ada; … rejected by Ben: too hot" — a history in one cell. */
export function historyText(steps: HistoryStep[]): string {
  return steps.map((e) => {
    const when = `${e.at.toISOString().slice(0, 16).replace('T', ' ')} UTC`
    return `${when} ${e.decision} by ${e.by ?? 'a former member'}${e.note ? `: ${e.note}` : ''}`
  }).join('; ')
}

export interface Blocker {
  code: 'empty' | 'pending' | 'undecodable' | 'undecided-fail'
  message: string
  frameIds: number[]
}

const LISTED = 10

/** "#4 a.png, #9 b.png" — the first few frames by index, then how many more. */
export function frameList(rows: Pick<SheetRow, 'seq' | 'name'>[]): string {
  const sorted = [...rows].sort((a, b) => a.seq - b.seq)
  const shown = sorted.slice(0, LISTED).map((r) => `#${r.seq} ${r.name}`).join(', ')
  return sorted.length > LISTED ? `${shown} and ${sorted.length - LISTED} more` : shown
}

const frames = (n: number) => `${n} frame${n === 1 ? '' : 's'}`
const failingFrames = (n: number) => `${n} failing frame${n === 1 ? '' : 's'}`

/**
 * Why a reel cannot be signed off yet, each reason naming the frames. A frame whose file
 * could not be decoded was never measured, so it cannot stand on a sheet as checked: it
 * blocks until a reviewer rejects it (the sheet then fails, which is what the file deserves)
 * or it leaves the reel.
 */
export function signoffBlockers(rows: SheetRow[]): Blocker[] {
  if (!rows.length) return [{ code: 'empty', message: 'The reel has no frames to sign off', frameIds: [] }]
  const out: Blocker[] = []
  const pending = rows.filter((r) => r.status === 'queued' || r.status === 'analysing')
  if (pending.length) {
    out.push({ code: 'pending', message: `${frames(pending.length)} still analysing: ${frameList(pending)}`, frameIds: pending.map((r) => r.frameId) })
  }
  const undecodable = rows.filter((r) => r.status === 'failed' && r.decision !== 'rejected')
  if (undecodable.length) {
    out.push({
      code: 'undecodable',
      message: `${frames(undecodable.length)} could not be measured (the file did not decode) and ${undecodable.length === 1 ? 'is' : 'are'} not rejected: ${frameList(undecodable)}`,
      frameIds: undecodable.map((r) => r.frameId),
    })
  }
  const undecided = rows.filter((r) => r.status === 'done' && r.verdict === 'fail' && !r.decision)
  if (undecided.length) {
    out.push({ code: 'undecided-fail', message: `${failingFrames(undecided.length)} ${undecided.length === 1 ? 'has' : 'have'} no decision: ${frameList(undecided)}`, frameIds: undecided.map((r) => r.frameId) })
  }
  return out
}

export const OVERALL = ['pass', 'pass-with-exceptions', 'fail'] as const
export type Overall = (typeof OVERALL)[number]

export const OVERALL_LABELS: Record<Overall, string> = {
  'pass': 'PASS',
  'pass-with-exceptions': 'PASS WITH EXCEPTIONS',
  'fail': 'FAIL',
}

export interface SheetSummary {
  frames: number
  verdicts: { pass: number; caution: number; fail: number; notMeasured: number }
  decisions: { accepted: number; rejected: number; waived: number; none: number }
  /** Frames with a fail verdict that a reviewer accepted or waived. */
  overridden: number
  overall: Overall
  /** Why the overall result is what it is, in the words printed on the sheet. */
  because: string
}

/**
 * The overall result:
 * - fail when any frame is rejected, any failing frame has no decision, or any frame was
 *   not measured without being rejected (none of the last two survive a sign-off, but the
 *   rule stands on its own);
 * - pass with exceptions when nothing fails but a reviewer accepted or waived a frame the
 *   spec failed, or waived any frame: the producer must see that a person overrode the
 *   measurement;
 * - pass otherwise (caution frames pass: they are inside the limits, near them).
 */
export function summarise(rows: SheetRow[]): SheetSummary {
  const verdicts = { pass: 0, caution: 0, fail: 0, notMeasured: 0 }
  const decisions = { accepted: 0, rejected: 0, waived: 0, none: 0 }
  let overridden = 0
  let undecidedFail = 0
  let unmeasured = 0
  for (const r of rows) {
    if (r.status === 'done' && r.verdict) verdicts[r.verdict]++
    else verdicts.notMeasured++
    decisions[r.decision ?? 'none']++
    if (r.verdict === 'fail' && (r.decision === 'accepted' || r.decision === 'waived')) overridden++
    if (r.status === 'done' && r.verdict === 'fail' && !r.decision) undecidedFail++
    if (r.status !== 'done' && r.decision !== 'rejected') unmeasured++
  }
  const reasons: string[] = []
  if (decisions.rejected) reasons.push(`${frames(decisions.rejected)} rejected`)
  if (undecidedFail) reasons.push(`${failingFrames(undecidedFail)} without a decision`)
  if (unmeasured) reasons.push(`${frames(unmeasured)} not measured`)
  if (!rows.length) reasons.push('no frames')
  let overall: Overall
  let because: string
  if (reasons.length) {
    overall = 'fail'
    because = reasons.join('; ')
  } else if (overridden || decisions.waived) {
    overall = 'pass-with-exceptions'
    const parts = []
    if (overridden) parts.push(`${failingFrames(overridden)} accepted or waived by a reviewer`)
    const waivedOther = rows.filter((r) => r.decision === 'waived' && r.verdict !== 'fail').length
    if (waivedOther) parts.push(`${frames(waivedOther)} waived`)
    because = parts.join('; ')
  } else {
    overall = 'pass'
    because = verdicts.caution
      ? `every frame within the spec; ${frames(verdicts.caution)} near a limit (caution)`
      : 'every frame within the spec'
  }
  return { frames: rows.length, verdicts, decisions, overridden, overall, because }
}

/** Frames whose scopes go on the sheet: what failed, what a person rejected or waived. */
export function framesWithScopes(rows: SheetRow[]): SheetRow[] {
  return rows.filter((r) => r.status === 'done' && (r.verdict === 'fail' || r.decision === 'rejected' || r.decision === 'waived'))
}

export const CSV_COLUMNS = [
  'index', 'timecode', 'name', 'status', 'luma_min_ire', 'luma_max_ire', 'composite_max_ire', 'out_of_range_pct',
  'verdict', 'reasons', 'decision', 'note', 'decided_by', 'decided_at', 'decision_history', 'spec', 'spec_version',
  'engine_version', 'lineup',
] as const

const round = (v: number | null, digits: number) => (v === null ? '' : (Math.round(v * 10 ** digits) / 10 ** digits).toFixed(digits))

/**
 * A spreadsheet reads a cell that starts with =, +, - or @ as a formula; a file name or a
 * note must never run as one on the producer's machine, so such text gets a leading quote.
 * The same goes for the same characters after a `;` or `,`: a spreadsheet that splits the
 * file on another delimiter than ours would start a new cell there.
 */
export function safeText(s: string): string {
  return (/^[=+\-@\t\r]/.test(s) ? `'${s}` : s).replace(/([;,]\s*)([=+\-@\t\r])/g, "$1'$2")
}

/** Columns that hold numbers; every other cell is text and is always written in quotes. */
export const CSV_NUMBER_COLUMNS: ReadonlySet<string> = new Set(['index', 'luma_min_ire', 'luma_max_ire', 'composite_max_ire', 'out_of_range_pct', 'spec_version'])

export type CsvRecord = Record<(typeof CSV_COLUMNS)[number], string>

export function csvRecord(r: SheetRow): CsvRecord {
  return {
    index: String(r.seq),
    timecode: r.timecode ?? NO_TIMECODE,
    name: safeText(r.name),
    status: r.status === 'failed' ? 'not measured' : r.status,
    luma_min_ire: round(r.lumaMinIre, 2),
    luma_max_ire: round(r.lumaMaxIre, 2),
    composite_max_ire: round(r.compMaxIre, 2),
    out_of_range_pct: round(r.outShare === null ? null : r.outShare * 100, 4),
    verdict: r.verdict ?? '',
    reasons: safeText(r.status === 'failed' ? (r.failReason ?? '') : r.reasons.map((x) => x.message).join('; ')),
    decision: r.decision ?? '',
    note: safeText(r.note),
    decided_by: safeText(r.decidedBy ?? ''),
    decided_at: r.decidedAt ? r.decidedAt.toISOString() : '',
    decision_history: safeText(historyText(r.history ?? [])),
    spec: r.specName ?? '',
    spec_version: r.specVersion === null ? '' : String(r.specVersion),
    engine_version: r.engineVersion ?? '',
    lineup: safeText((r.lineup ?? []).join(' | ')),
  }
}
