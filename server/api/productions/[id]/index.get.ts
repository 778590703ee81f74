import { asc, eq, sql } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { specForProduction } from '../../../lib/specs'
import { reelSheetState } from '../../../lib/sheet'

/** The production overview: its reels with counts by status, verdict and decision, and the spec. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, role } = await requireProduction(event, id, 'view')
  const db = useDb()
  const f = tables.frames
  const sum = (cond: ReturnType<typeof sql>) => sql<number>`coalesce(sum(${cond}), 0)`
  const reels = await db.select({
    reel: tables.reels,
    total: sql<number>`count(${f.id})`,
    queued: sum(sql`${f.status} = 'queued'`),
    analysing: sum(sql`${f.status} = 'analysing'`),
    done: sum(sql`${f.status} = 'done'`),
    failed: sum(sql`${f.status} = 'failed'`),
    pass: sum(sql`${tables.analyses.verdict} = 'pass'`),
    caution: sum(sql`${tables.analyses.verdict} = 'caution'`),
    fail: sum(sql`${tables.analyses.verdict} = 'fail'`),
    accepted: sum(sql`${tables.decisions.decision} = 'accepted'`),
    rejected: sum(sql`${tables.decisions.decision} = 'rejected'`),
    waived: sum(sql`${tables.decisions.decision} = 'waived'`),
    lastFrameAt: sql<Date | null>`max(greatest(${f.updatedAt}, coalesce(${tables.decisions.updatedAt}, ${f.updatedAt})))`,
  }).from(tables.reels)
    .leftJoin(f, eq(f.reelId, tables.reels.id))
    .leftJoin(tables.analyses, eq(tables.analyses.frameId, f.id))
    .leftJoin(tables.decisions, eq(tables.decisions.frameId, f.id))
    .where(eq(tables.reels.productionId, production.id))
    .groupBy(tables.reels.id)
    .orderBy(asc(tables.reels.createdAt))
  const { spec, version, id: specId } = await specForProduction(db, production.id)
  const sheets = await Promise.all(reels.map(({ reel }) => reelSheetState(db, reel.id)))
  return {
    ...production,
    role,
    spec: { id: specId, name: spec.name, title: spec.title, version },
    reels: reels.map(({ reel, lastFrameAt, ...c }, i) => {
      const counts = Object.fromEntries(Object.entries(c).map(([k, v]) => [k, Number(v ?? 0)])) as Record<keyof typeof c, number>
      const decided = counts.accepted + counts.rejected + counts.waived
      const last = lastFrameAt ? new Date(lastFrameAt as unknown as string) : null
      return {
        ...reel,
        sheet: sheets[i]!,
        counts: { ...counts, undecided: counts.done - decided },
        lastActivity: last && last > reel.updatedAt ? last : reel.updatedAt,
      }
    }),
  }
})
