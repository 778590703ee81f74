import { IdParams } from '../../../../shared/utils/validation'
import { DecisionBody } from '../../../../shared/utils/decisions'
import { recordDecisions } from '../../../lib/decisions'

/** A reviewer's or owner's decision on one analysed frame. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { frame, user } = await requireFrame(event, id, 'decide')
  const { decision, note } = await readValidatedBody(event, DecisionBody.parse)
  if (frame.status === 'failed' && decision !== 'rejected') {
    throw createError({ statusCode: 409, statusMessage: 'This frame\'s file could not be decoded, so there is nothing to accept or waive; reject it, or remove it from the reel' })
  }
  if (frame.status !== 'done' && frame.status !== 'failed') throw createError({ statusCode: 409, statusMessage: 'This frame has no analysis yet; decide once it is analysed' })
  await useDb().transaction(async (tx) => {
    await assertReelOpen(frame.reelId, tx)
    const res = await recordDecisions(tx, { teamId: frame.teamId, reelId: frame.reelId, frameIds: [frame.id], userId: user.id, decision, note })
    // Queued inside the transaction: with Redis down the decision is refused (503), never saved unannounced.
    if (decision === 'rejected') await queueRejectionMails(tx, { teamId: frame.teamId, frameIds: res.updatedIds, decider: user, note })
  })
  return { decision, note, decidedBy: { id: user.id, name: user.name }, decidedAt: new Date() }
})
