import { eq } from 'drizzle-orm'
import { TeamParams } from '../../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  await requireTeamRole(event, teamId, 'view')
  return useDb()
    .select({ userId: tables.users.id, name: tables.users.name, email: tables.users.email, role: tables.memberships.role, since: tables.memberships.createdAt })
    .from(tables.memberships)
    .innerJoin(tables.users, eq(tables.users.id, tables.memberships.userId))
    .where(eq(tables.memberships.teamId, teamId))
    .orderBy(tables.users.name)
})
