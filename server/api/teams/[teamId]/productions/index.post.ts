import { and, asc, eq } from 'drizzle-orm'
import { ensureTeamSpecs } from '../../../../lib/specs'
import { ProductionBody, TeamParams } from '../../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'createProduction')
  const { specId, ...body } = await readValidatedBody(event, ProductionBody.parse)
  await ensureTeamSpecs(useDb(), teamId)
  const { id, chosen } = await useDb().transaction(async (tx) => {
    // The spec chosen in the form, else the team's first spec until an owner picks another.
    const [spec] = await tx.select({ id: tables.deliverySpecs.id }).from(tables.deliverySpecs)
      .where(specId ? and(eq(tables.deliverySpecs.teamId, teamId), eq(tables.deliverySpecs.id, specId)) : eq(tables.deliverySpecs.teamId, teamId))
      .orderBy(asc(tables.deliverySpecs.id)).limit(1)
    if (specId && !spec) throw createError({ statusCode: 400, statusMessage: 'Choose one of the team’s delivery specs' })
    const id = firstId(await tx.insert(tables.productions).values({ ...body, teamId, createdBy: user.id, deliverySpecId: spec?.id ?? null }).$returningId())
    await audit({ teamId, actorId: user.id, action: 'production.created', subjectType: 'production', subjectId: id, details: { ...body, specId: spec?.id ?? null } }, tx)
    return { id, chosen: spec?.id ?? null }
  })
  setResponseStatus(event, 201)
  return { id, ...body, specId: chosen }
})
