// The frames table keeps its whole state (page, sort, filters) in the address, so a filtered
// view can be reloaded, shared and returned to from a frame; the server does the paging.
import { FRAME_STATUSES, type FrameStatus } from '../../shared/utils/uploads'
import { DECISIONS, type Decision } from '../../shared/utils/decisions'

export const VERDICTS = ['pass', 'caution', 'fail'] as const
export type Verdict = (typeof VERDICTS)[number]

/** `none` asks for frames nobody has decided yet. */
export const DECISION_FILTERS = [...DECISIONS, 'none'] as const
export type DecisionFilter = Decision | 'none'

export const FRAME_SORT_KEYS = ['seq', 'name', 'status', 'verdict', 'decision', 'lumaMin', 'lumaMax', 'compMax', 'outShare'] as const
export type FrameSortKey = (typeof FRAME_SORT_KEYS)[number]

export const PAGE_SIZES = [25, 50, 100, 200] as const
/** The server caps a search at 100 characters. */
export const SEARCH_MAX = 100

export interface FrameListState {
  page: number
  pageSize: number
  status: FrameStatus | ''
  verdict: Verdict | ''
  decision: DecisionFilter | ''
  q: string
  sort: FrameSortKey
  dir: 'asc' | 'desc'
}

export const DEFAULT_FRAME_LIST: Readonly<FrameListState> = Object.freeze({
  page: 1, pageSize: 50, status: '', verdict: '', decision: '', q: '', sort: 'seq', dir: 'asc',
})

const oneOf = <T extends string>(list: readonly T[], v: unknown): T | undefined =>
  typeof v === 'string' && (list as readonly string[]).includes(v) ? (v as T) : undefined

const first = (v: unknown): unknown => (Array.isArray(v) ? v[0] : v)

function positiveInt(v: unknown): number | undefined {
  const n = Number(first(v))
  return Number.isInteger(n) && n >= 1 && n <= 100_000 ? n : undefined
}

/** Reads the address's query; anything unknown or malformed falls back to the default. */
export function frameListFromQuery(query: Record<string, unknown>): FrameListState {
  const d = DEFAULT_FRAME_LIST
  const size = positiveInt(query.size)
  return {
    page: positiveInt(query.page) ?? d.page,
    pageSize: size && (PAGE_SIZES as readonly number[]).includes(size) ? size : d.pageSize,
    status: oneOf(FRAME_STATUSES, first(query.status)) ?? '',
    verdict: oneOf(VERDICTS, first(query.verdict)) ?? '',
    decision: oneOf(DECISION_FILTERS, first(query.decision)) ?? '',
    q: typeof first(query.q) === 'string' ? String(first(query.q)).slice(0, SEARCH_MAX) : '',
    sort: oneOf(FRAME_SORT_KEYS, first(query.sort)) ?? d.sort,
    dir: first(query.dir) === 'desc' ? 'desc' : 'asc',
  }
}

/** The address's query for a state: only what differs from the default, so plain views keep plain URLs. */
export function frameListToQuery(s: FrameListState): Record<string, string> {
  const d = DEFAULT_FRAME_LIST
  const out: Record<string, string> = {}
  if (s.page !== d.page) out.page = String(s.page)
  if (s.pageSize !== d.pageSize) out.size = String(s.pageSize)
  if (s.status) out.status = s.status
  if (s.verdict) out.verdict = s.verdict
  if (s.decision) out.decision = s.decision
  if (s.q.trim()) out.q = s.q.trim()
  if (s.sort !== d.sort) out.sort = s.sort
  if (s.dir !== d.dir) out.dir = s.dir
  return out
}

/** The query of `GET /api/reels/:id/frames` for a state; empty filters are left out, not sent blank. */
export function frameListApiQuery(s: FrameListState): Record<string, string | number> {
  const out: Record<string, string | number> = { page: s.page, pageSize: s.pageSize, sort: s.sort, dir: s.dir }
  if (s.status) out.status = s.status
  if (s.verdict) out.verdict = s.verdict
  if (s.decision) out.decision = s.decision
  const q = s.q.trim().slice(0, SEARCH_MAX)
  if (q) out.q = q
  return out
}

/** A change of filter or sort starts again at page 1: page 7 of the old view means nothing in the new one. */
export function withFilter(s: FrameListState, change: Partial<Omit<FrameListState, 'page'>>): FrameListState {
  return { ...s, ...change, page: 1 }
}

export function pageCount(total: number, pageSize: number): number {
  return Math.max(1, Math.ceil(total / pageSize))
}

/** e.g. "51–100 of 1,234"; "0 of 0" when nothing matches. */
export function pageRangeText(page: number, pageSize: number, total: number): string {
  const fmt = (n: number) => n.toLocaleString('en-GB')
  if (total <= 0) return '0 of 0'
  const from = Math.min((page - 1) * pageSize + 1, total)
  const to = Math.min(page * pageSize, total)
  return `${fmt(from)}–${fmt(to)} of ${fmt(total)}`
}

/** TanStack's sorting state ↔ the server's sort key (the column ids are the sort keys). */
export function sortingFromState(s: Pick<FrameListState, 'sort' | 'dir'>): { id: FrameSortKey; desc: boolean }[] {
  return [{ id: s.sort, desc: s.dir === 'desc' }]
}

export function stateFromSorting(sorting: { id: string; desc: boolean }[]): Pick<FrameListState, 'sort' | 'dir'> {
  const s = sorting[0]
  const key = s && oneOf(FRAME_SORT_KEYS, s.id)
  return key ? { sort: key, dir: s.desc ? 'desc' : 'asc' } : { sort: DEFAULT_FRAME_LIST.sort, dir: DEFAULT_FRAME_LIST.dir }
}
