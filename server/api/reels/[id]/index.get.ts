import { eq, sql } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { specForProduction } from '../../../lib/specs'
import { reelSheetState } from '../../../lib/sheet'

/** The reel with its production, the spec it is measured against and counts by status and verdict. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, role } = await requireReel(event, id, 'view')
  const db = useDb()
  const [production] = await db.select({ id: tables.productions.id, name: tables.productions.name }).from(tables.productions).where(eq(tables.productions.id, reel.productionId))
  // The foreign keys keep these rows; a miss means the reel went while this request ran.
  if (!production) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const [counts] = await db.select({
    total: sql<number>`count(*)`,
    queued: sql<number>`coalesce(sum(${tables.frames.status} = 'queued'), 0)`,
    analysing: sql<number>`coalesce(sum(${tables.frames.status} = 'analysing'), 0)`,
    done: sql<number>`coalesce(sum(${tables.frames.status} = 'done'), 0)`,
    failed: sql<number>`coalesce(sum(${tables.frames.status} = 'failed'), 0)`,
    pass: sql<number>`coalesce(sum(${tables.analyses.verdict} = 'pass'), 0)`,
    caution: sql<number>`coalesce(sum(${tables.analyses.verdict} = 'caution'), 0)`,
    fail: sql<number>`coalesce(sum(${tables.analyses.verdict} = 'fail'), 0)`,
    accepted: sql<number>`coalesce(sum(${tables.decisions.decision} = 'accepted'), 0)`,
    rejected: sql<number>`coalesce(sum(${tables.decisions.decision} = 'rejected'), 0)`,
    waived: sql<number>`coalesce(sum(${tables.decisions.decision} = 'waived'), 0)`,
  }).from(tables.frames).leftJoin(tables.analyses, eq(tables.analyses.frameId, tables.frames.id))
    .leftJoin(tables.decisions, eq(tables.decisions.frameId, tables.frames.id)).where(eq(tables.frames.reelId, reel.id))
  // Picture sizes in the reel, so the page can say when they do not suit the reel's matrix.
  const sizes = await db.select({ width: tables.frames.width, height: tables.frames.height, frames: sql<number>`count(*)` })
    .from(tables.frames).where(eq(tables.frames.reelId, reel.id)).groupBy(tables.frames.width, tables.frames.height)
  const { spec, version } = await specForProduction(db, reel.productionId)
  const n = (v: unknown) => Number(v ?? 0)
  const sheet = await reelSheetState(db, reel.id)
  return {
    ...reel,
    role,
    production,
    spec: { name: spec.name, title: spec.title, version },
    sizes: sizes.map((s) => ({ ...s, frames: n(s.frames) })),
    sheet,
    // MariaDB answers sums as strings.
    counts: {
      total: n(counts?.total), queued: n(counts?.queued), analysing: n(counts?.analysing), done: n(counts?.done), failed: n(counts?.failed),
      pass: n(counts?.pass), caution: n(counts?.caution), fail: n(counts?.fail),
      accepted: n(counts?.accepted), rejected: n(counts?.rejected), waived: n(counts?.waived),
    },
  }
})
