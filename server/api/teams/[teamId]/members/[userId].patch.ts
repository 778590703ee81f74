import { and, eq } from 'drizzle-orm'
import { RoleChangeBody } from '../../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId, userId } = await getValidatedRouterParams(event, MemberParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'manageTeam')
  const { role } = await readValidatedBody(event, RoleChangeBody.parse)
  await useDb().transaction(async (tx) => {
    const m = await lockMembership(tx, teamId, userId, role)
    await tx.update(tables.memberships).set({ role }).where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.userId, userId)))
    await audit({ teamId, actorId: user.id, action: 'member.role_changed', subjectType: 'user', subjectId: userId, details: { from: m.role, to: role } }, tx)
  })
  return { userId, role }
})
