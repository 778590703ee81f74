import { and, eq, isNull } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const { teamId, userId } = await getValidatedRouterParams(event, MemberParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'manageTeam')
  await useDb().transaction(async (tx) => {
    const m = await lockMembership(tx, teamId, userId, null)
    await tx.delete(tables.memberships).where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.userId, userId)))
    // Their tokens for this team end with the membership (a later re-invitation does not revive them).
    await tx.update(tables.apiTokens).set({ revokedAt: new Date() })
      .where(and(eq(tables.apiTokens.teamId, teamId), eq(tables.apiTokens.userId, userId), isNull(tables.apiTokens.revokedAt)))
    await audit({ teamId, actorId: user.id, action: 'member.removed', subjectType: 'user', subjectId: userId, details: { role: m.role } }, tx)
  })
  setResponseStatus(event, 204)
  return null
})
