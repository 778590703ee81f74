import { asc, eq, sql } from 'drizzle-orm'
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
  const rows = await db.select({
    spec: s,
    productions: sql<number>`(select count(*) from ${tables.productions} p where p.delivery_spec_id = ${s.id} and p.archived = 0)`,
  }).from(s).where(eq(s.teamId, teamId)).orderBy(sql`${s.builtin} is null`, asc(s.id))
  return {
    role,
    specs: rows.map(({ spec, productions }) => ({
      id: spec.id, builtin: spec.builtin, version: spec.version, updatedAt: spec.updatedAt,
      spec: DeliverySpecSchema.parse(spec.body), productions: Number(productions),
    })),
  }
})
