import { and, eq } from 'drizzle-orm'
import { SpecCreateBody } from '../../../../../shared/utils/specs'
import { TeamParams } from '../../../../../shared/utils/validation'
import { ensureTeamSpecs, insertSpec } from '../../../../lib/specs'

/** A new team spec (the form's "copy and edit" sends a copy of any spec, renamed). */
export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'manageSpecs')
  const { spec } = await readValidatedBody(event, SpecCreateBody.parse)
  const db = useDb()
  await ensureTeamSpecs(db, teamId)
  const id = await db.transaction(async (tx) => {
    // Names identify a spec on every analysis and sheet: one per team. The team lock makes two
    // parallel saves of the same name find each other.
    await tx.select({ id: tables.teams.id }).from(tables.teams).where(eq(tables.teams.id, teamId)).for('update')
    const same = await tx.select({ id: tables.deliverySpecs.id, body: tables.deliverySpecs.body }).from(tables.deliverySpecs)
      .where(and(eq(tables.deliverySpecs.teamId, teamId)))
    if (same.some((r) => (r.body as { name: string }).name === spec.name)) {
      throw createError({ statusCode: 409, statusMessage: `The team already has a spec named “${spec.name}”: choose another short name` })
    }
    const id = await insertSpec(tx, { teamId, builtin: null, spec, userId: user.id })
    await audit({ teamId, actorId: user.id, action: 'spec.created', subjectType: 'delivery_spec', subjectId: id, details: { name: spec.name, title: spec.title } }, tx)
    return id
  })
  setResponseStatus(event, 201)
  return { id, version: 1 }
})
