import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { ReelPatchBody } from '../../../../shared/utils/uploads'

export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const body = await readValidatedBody(event, ReelPatchBody.parse)
  await useDb().update(tables.reels).set(body).where(eq(tables.reels.id, reel.id))
  await audit({ teamId: reel.teamId, actorId: user.id, action: 'reel.updated', subjectType: 'reel', subjectId: reel.id, details: body })
  return { ...reel, ...body }
})
