import { asc, eq } from 'drizzle-orm'
import { ProductionBody, TeamParams } from '../../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'createProduction')
  const body = await readValidatedBody(event, ProductionBody.parse)
  const id = await useDb().transaction(async (tx) => {
    // A new production is measured against the team's first spec until an owner picks another.
    const [spec] = await tx.select({ id: tables.deliverySpecs.id }).from(tables.deliverySpecs)
      .where(eq(tables.deliverySpecs.teamId, teamId)).orderBy(asc(tables.deliverySpecs.id)).limit(1)
    const id = firstId(await tx.insert(tables.productions).values({ ...body, teamId, createdBy: user.id, deliverySpecId: spec?.id ?? null }).$returningId())
    await audit({ teamId, actorId: user.id, action: 'production.created', subjectType: 'production', subjectId: id, details: body }, tx)
    return id
  })
  setResponseStatus(event, 201)
  return { id, ...body }
})
