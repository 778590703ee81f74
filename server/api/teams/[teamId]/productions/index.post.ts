import { ProductionBody, TeamParams } from '../../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'createProduction')
  const body = await readValidatedBody(event, ProductionBody.parse)
  const id = await useDb().transaction(async (tx) => {
    const [{ id }] = await tx.insert(tables.productions).values({ ...body, teamId, createdBy: user.id }).$returningId()
    await audit({ teamId, actorId: user.id, action: 'production.created', subjectType: 'production', subjectId: id, details: body }, tx)
    return id
  })
  setResponseStatus(event, 201)
  return { id, ...body }
})
