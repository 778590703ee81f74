import { and, asc, desc, eq, inArray, isNull, like, sql, type SQL } from 'drizzle-orm'
import { z } from 'zod'
import { IdParams } from '../../../../shared/utils/validation'
import { FRAME_STATUSES } from '../../../../shared/utils/uploads'
import { DECISIONS } from '../../../../shared/utils/decisions'

const SORTS = { seq: tables.frames.seq, name: tables.frames.name, status: tables.frames.status, verdict: tables.analyses.verdict,
  decision: tables.decisions.decision, lumaMin: tables.analyses.lumaMinIre, lumaMax: tables.analyses.lumaMaxIre, compMax: tables.analyses.compMaxIre, outShare: tables.analyses.outShare } as const

const Query = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
  status: z.enum(FRAME_STATUSES).optional(),
  verdict: z.enum(['pass', 'caution', 'fail']).optional(),
  decision: z.enum([...DECISIONS, 'none']).optional(),
  q: z.string().trim().max(100).optional(),
  sort: z.enum(Object.keys(SORTS) as [keyof typeof SORTS]).default('seq'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  /** Only these frames (the upload panel follows the files it sent): comma-separated ids, at most 500. */
  ids: z.string().regex(/^\d{1,12}(,\d{1,12}){0,499}$/, 'ids: up to 500 frame ids, comma-separated').optional()
    .transform((v) => (v ? v.split(',').map(Number) : undefined)),
})

/** Frames of a reel with status, verdict and key figures (IRE, 7.5 setup), paginated in SQL. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel } = await requireReel(event, id, 'view')
  const q = await getValidatedQuery(event, Query.parse)
  const where: SQL[] = [eq(tables.frames.reelId, reel.id), eq(tables.frames.teamId, reel.teamId)]
  if (q.ids) where.push(inArray(tables.frames.id, q.ids))
  if (q.status) where.push(eq(tables.frames.status, q.status))
  if (q.verdict) where.push(eq(tables.analyses.verdict, q.verdict))
  if (q.decision === 'none') where.push(isNull(tables.decisions.id))
  else if (q.decision) where.push(eq(tables.decisions.decision, q.decision))
  if (q.q) where.push(like(tables.frames.name, `%${q.q.replace(/[%_\\]/g, '\\$&')}%`))
  const db = useDb()
  const cond = and(...where)
  const [counted] = await db.select({ total: sql<number>`count(*)` }).from(tables.frames)
    .leftJoin(tables.analyses, eq(tables.analyses.frameId, tables.frames.id))
    .leftJoin(tables.decisions, eq(tables.decisions.frameId, tables.frames.id)).where(cond)
  const order = q.dir === 'asc' ? asc(SORTS[q.sort]) : desc(SORTS[q.sort])
  const rows = await db.select({
    id: tables.frames.id, seq: tables.frames.seq, name: tables.frames.name, timecode: tables.frames.timecode,
    format: tables.frames.format, width: tables.frames.width, height: tables.frames.height,
    status: tables.frames.status, failReason: tables.frames.failReason, createdAt: tables.frames.createdAt,
    verdict: tables.analyses.verdict, lumaMinIre: tables.analyses.lumaMinIre, lumaMaxIre: tables.analyses.lumaMaxIre,
    lumaMeanIre: tables.analyses.lumaMeanIre, compMinIre: tables.analyses.compMinIre, compMaxIre: tables.analyses.compMaxIre,
    outShare: tables.analyses.outShare,
    decision: tables.decisions.decision, decisionNote: tables.decisions.note, decidedAt: tables.decisions.updatedAt,
    recheckAt: tables.decisions.recheckAt,
    decidedById: tables.users.id, decidedByName: tables.users.name,
  }).from(tables.frames).leftJoin(tables.analyses, eq(tables.analyses.frameId, tables.frames.id))
    .leftJoin(tables.decisions, eq(tables.decisions.frameId, tables.frames.id))
    .leftJoin(tables.users, eq(tables.users.id, tables.decisions.decidedBy))
    .where(cond).orderBy(order, asc(tables.frames.seq)).limit(q.pageSize).offset((q.page - 1) * q.pageSize)
  return {
    page: q.page, pageSize: q.pageSize, total: Number(counted?.total ?? 0),
    frames: rows.map(({ decision, decisionNote, decidedAt, recheckAt, decidedById, decidedByName, ...r }) => ({
      ...r,
      thumbUrl: r.status === 'done' ? `/api/frames/${r.id}/images/thumb` : null,
      decision: decision ? { decision, note: decisionNote, decidedBy: decidedById ? { id: decidedById, name: decidedByName } : null, decidedAt, recheck: !!recheckAt } : null,
    })),
  }
})
