import { IdParams } from '../../../../shared/utils/validation'
import { ReelBody } from '../../../../shared/utils/uploads'

export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, user } = await requireProduction(event, id, 'upload')
  const body = await readValidatedBody(event, ReelBody.parse)
  const reelId = await useDb().transaction(async (tx) => {
    const reelId = firstId(await tx.insert(tables.reels).values({ ...body, teamId: production.teamId, productionId: production.id, createdBy: user.id }).$returningId())
    await audit({ teamId: production.teamId, actorId: user.id, action: 'reel.created', subjectType: 'reel', subjectId: reelId, details: body }, tx)
    return reelId
  })
  setResponseStatus(event, 201)
  return { id: reelId, productionId: production.id, ...body }
})
