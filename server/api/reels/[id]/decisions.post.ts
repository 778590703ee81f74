import { IdParams } from '../../../../shared/utils/validation'
import { BulkDecisionBody } from '../../../../shared/utils/decisions'
import { recordDecisions } from '../../../lib/decisions'

/** The same decision and note on many frames of a reel at once. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'decide')
  const { frameIds, decision, note } = await readValidatedBody(event, BulkDecisionBody.parse)
  await assertReelOpen(reel.id)
  const res = await useDb().transaction((tx) => recordDecisions(tx, { teamId: reel.teamId, frameIds, userId: user.id, decision, note }))
  // Ids of other reels or teams are ignored, exactly as ids that do not exist.
  return { updated: res.updated, notAnalysed: res.notReady }
})
