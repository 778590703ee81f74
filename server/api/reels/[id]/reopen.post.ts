import { and, eq, isNull } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { ReopenBody } from '../../../../shared/utils/sheets'

/** An owner unlocks a signed reel; the sign-off and its sheet stay stored, marked superseded. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'reopen')
  const { reason } = await readValidatedBody(event, ReopenBody.parse)
  const supersededAt = new Date()
  const signoffId = await useDb().transaction(async (tx) => {
    const [locked] = await tx.select().from(tables.reels).where(eq(tables.reels.id, reel.id)).for('update')
    if (!locked?.signedAt) throw createError({ statusCode: 409, statusMessage: 'This reel is not signed off; there is nothing to reopen' })
    const [current] = await tx.select({ id: tables.signoffs.id }).from(tables.signoffs)
      .where(and(eq(tables.signoffs.reelId, reel.id), isNull(tables.signoffs.supersededAt))).for('update')
    if (current) {
      await tx.update(tables.signoffs).set({ supersededAt, supersededBy: user.id, reopenReason: reason }).where(eq(tables.signoffs.id, current.id))
    }
    await tx.update(tables.reels).set({ signedAt: null, signedBy: null }).where(eq(tables.reels.id, reel.id))
    await audit({
      teamId: reel.teamId, actorId: user.id, action: 'reel.reopened', subjectType: 'reel', subjectId: reel.id,
      details: { signoffId: current?.id ?? null, reason, signedAt: locked.signedAt, signedBy: locked.signedBy },
    }, tx)
    return current?.id ?? null
  })
  return { reopened: true, supersededSignoffId: signoffId, supersededAt }
})
