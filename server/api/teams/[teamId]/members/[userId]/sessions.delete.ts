import { and, eq, isNull } from 'drizzle-orm'

/**
 * An owner signs a member out everywhere (a lost laptop, a shared password): every session
 * of that person ends, and their API tokens for this team are revoked.
 */
export default defineEventHandler(async (event) => {
  const { teamId, userId } = await getValidatedRouterParams(event, MemberParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'manageTeam')
  const result = await useDb().transaction(async (tx) => {
    const [m] = await tx.select({ role: tables.memberships.role }).from(tables.memberships)
      .where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.userId, userId))).limit(1)
    if (!m) throw createError({ statusCode: 404, statusMessage: 'Not found' })
    const sessions = await endUserSessions(userId, tx)
    const [revoked] = await tx.update(tables.apiTokens).set({ revokedAt: new Date() })
      .where(and(eq(tables.apiTokens.teamId, teamId), eq(tables.apiTokens.userId, userId), isNull(tables.apiTokens.revokedAt)))
    const tokens = (revoked as { affectedRows?: number }).affectedRows ?? 0
    await audit({ teamId, actorId: user.id, action: 'member.signed_out', subjectType: 'user', subjectId: userId, details: { sessions, tokens } }, tx)
    return { sessions, tokens }
  })
  // The owner signing themselves out this way ends their own cookie too.
  if (userId === user.id) await clearUserSession(event)
  return result
})
