import { and, asc, desc, eq } from 'drizzle-orm'
import { DeliverySpecSchema } from '../../../../shared/engine'
import { IdParams } from '../../../../shared/utils/validation'
import { ensureTeamSpecs } from '../../../lib/specs'

/** One spec with its history (every version, what changed, what re-judging changed) and the productions using it. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { row, role } = await requireTeamRow(event, tables.deliverySpecs, id, 'view')
  const db = useDb()
  await ensureTeamSpecs(db, row.teamId)
  const v = tables.deliverySpecVersions
  const versions = await db.select({ version: v.version, body: v.body, changes: v.changes, rejudge: v.rejudge, createdAt: v.createdAt, by: tables.users.name })
    .from(v).leftJoin(tables.users, eq(tables.users.id, v.createdBy))
    .where(and(eq(v.specId, row.id), eq(v.teamId, row.teamId))).orderBy(desc(v.version))
  const productions = await db.select({ id: tables.productions.id, name: tables.productions.name })
    .from(tables.productions).where(and(eq(tables.productions.teamId, row.teamId), eq(tables.productions.deliverySpecId, row.id)))
    .orderBy(asc(tables.productions.name))
  return {
    id: row.id, teamId: row.teamId, builtin: row.builtin, version: row.version, role,
    spec: DeliverySpecSchema.parse(row.body),
    versions: versions.map((x) => ({ ...x, body: DeliverySpecSchema.parse(x.body), changes: x.changes as string[] })),
    productions,
  }
})
