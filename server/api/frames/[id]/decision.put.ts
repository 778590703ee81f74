import { IdParams } from '../../../../shared/utils/validation'
import { DecisionBody } from '../../../../shared/utils/decisions'
import { recordDecisions } from '../../../lib/decisions'

/** A reviewer's or owner's decision on one analysed frame. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { frame, user } = await requireFrame(event, id, 'decide')
  const { decision, note } = await readValidatedBody(event, DecisionBody.parse)
  if (frame.status !== 'done') throw createError({ statusCode: 409, statusMessage: 'This frame has no analysis yet; decide once it is analysed' })
  await assertReelOpen(frame.reelId)
  await useDb().transaction((tx) => recordDecisions(tx, { teamId: frame.teamId, frameIds: [frame.id], userId: user.id, decision, note }))
  return { decision, note, decidedBy: { id: user.id, name: user.name }, decidedAt: new Date() }
})
