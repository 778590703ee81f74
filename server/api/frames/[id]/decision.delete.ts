import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'

/** Withdraws the decision on a frame (audited with what it was). */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { frame, user } = await requireFrame(event, id, 'decide')
  await useDb().transaction(async (tx) => {
    await assertReelOpen(frame.reelId, tx)
    const [prev] = await tx.select().from(tables.decisions).where(eq(tables.decisions.frameId, frame.id)).for('update')
    if (!prev) throw createError({ statusCode: 404, statusMessage: 'This frame has no decision' })
    await tx.delete(tables.decisions).where(eq(tables.decisions.frameId, frame.id))
    await audit({ teamId: frame.teamId, actorId: user.id, action: 'frame.decision_cleared', subjectType: 'frame', subjectId: frame.id, details: { previous: { decision: prev.decision, note: prev.note } } }, tx)
  })
  setResponseStatus(event, 204)
  return null
})
