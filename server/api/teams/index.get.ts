import { and, eq } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const { user, token } = await requireCaller(event)
  return useDb()
    .select({ id: tables.teams.id, name: tables.teams.name, role: tables.memberships.role })
    .from(tables.memberships)
    .innerJoin(tables.teams, eq(tables.teams.id, tables.memberships.teamId))
    // An API token sees only its own team.
    .where(token ? and(eq(tables.memberships.userId, user.id), eq(tables.memberships.teamId, token.teamId)) : eq(tables.memberships.userId, user.id))
    .orderBy(tables.teams.name)
})
