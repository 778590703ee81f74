import { and, asc, eq, sql } from 'drizzle-orm'
import { DeliverySpecSchema } from '../../../../../shared/engine'
import { TeamParams } from '../../../../../shared/utils/validation'
import { ensureTeamSpecs } from '../../../../lib/specs'

/** The team's delivery specs: the built-in ones (read-only) and its own, with the productions using each. */
export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { role } = await requireTeamRole(event, teamId, 'view')
  const db = useDb()
  await ensureTeamSpecs(db, teamId)
  const s = tables.deliverySpecs
  const rows = await db.select({ spec: s }).from(s).where(eq(s.teamId, teamId)).orderBy(sql`${s.builtin} is null`, asc(s.id))
  const p = tables.productions
  const used = new Map((await db.select({ specId: p.deliverySpecId, n: sql<number>`count(*)` }).from(p)
    .where(and(eq(p.teamId, teamId), eq(p.archived, false))).groupBy(p.deliverySpecId)).map((u) => [u.specId, Number(u.n)]))
  return {
    role,
    specs: rows.map(({ spec }) => ({
      id: spec.id, builtin: spec.builtin, version: spec.version, updatedAt: spec.updatedAt,
      spec: DeliverySpecSchema.parse(spec.body), productions: used.get(spec.id) ?? 0,
    })),
  }
})
