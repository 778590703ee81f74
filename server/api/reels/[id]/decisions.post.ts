import { IdParams } from '../../../../shared/utils/validation'
import { BulkDecisionBody } from '../../../../shared/utils/decisions'
import { recordDecisions } from '../../../lib/decisions'

/** The same decision and note on many frames of a reel at once. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'decide')
  const { frameIds, decision, note } = await readValidatedBody(event, BulkDecisionBody.parse)
  const res = await useDb().transaction(async (tx) => {
    await assertReelOpen(reel.id, tx)
    const res = await recordDecisions(tx, { teamId: reel.teamId, reelId: reel.id, frameIds, userId: user.id, decision, note })
    // One mail per uploader for the whole batch, queued inside the transaction so that with
    // Redis down the batch is refused (503) rather than saved unannounced.
    if (decision === 'rejected') await queueRejectionMails(tx, { teamId: reel.teamId, frameIds: res.updatedIds, decider: user, note })
    return res
  })
  // Ids of other reels or teams are ignored, exactly as ids that do not exist.
  return { updated: res.updated, notAnalysed: res.notReady }
})
