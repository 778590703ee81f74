import { and, eq, gt, isNull } from 'drizzle-orm'
import { ResetConfirmBody } from '../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { token, password } = await readValidatedBody(event, ResetConfirmBody.parse)
  const passwordHash = await hashPassword(password)
  const db = useDb()
  const user = await db.transaction(async (tx) => {
    const [reset] = await tx.select().from(tables.passwordResets)
      .where(and(eq(tables.passwordResets.tokenHash, hashToken(token)), isNull(tables.passwordResets.usedAt), gt(tables.passwordResets.expiresAt, new Date())))
      .for('update').limit(1)
    if (!reset) return null
    const now = new Date()
    // Spend every open link of this user, not only this one.
    await tx.update(tables.passwordResets).set({ usedAt: now }).where(and(eq(tables.passwordResets.userId, reset.userId), isNull(tables.passwordResets.usedAt)))
    await tx.update(tables.users).set({ passwordHash }).where(eq(tables.users.id, reset.userId))
    // Whoever knew the old password may hold a session: every one of them ends here.
    await endUserSessions(reset.userId, tx)
    const [u] = await tx.select().from(tables.users).where(eq(tables.users.id, reset.userId))
    await audit({ teamId: null, actorId: reset.userId, action: 'user.password_reset', subjectType: 'user', subjectId: reset.userId }, tx)
    return u
  })
  if (!user) throw createError({ statusCode: 410, statusMessage: 'This reset link has expired or was already used. Ask for a new one.' })
  await startSession(event, user)
  return { id: user.id, email: user.email, name: user.name }
})
