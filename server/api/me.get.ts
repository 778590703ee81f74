import { and, eq } from 'drizzle-orm'

/** The signed-in user and the teams they belong to, with their role in each. */
export default defineEventHandler(async (event) => {
  const { user, token } = await requireCaller(event)
  const teams = await useDb()
    .select({ id: tables.teams.id, name: tables.teams.name, role: tables.memberships.role })
    .from(tables.memberships)
    .innerJoin(tables.teams, eq(tables.teams.id, tables.memberships.teamId))
    // An API token sees only its own team.
    .where(token ? and(eq(tables.memberships.userId, user.id), eq(tables.memberships.teamId, token.teamId)) : eq(tables.memberships.userId, user.id))
    .orderBy(tables.teams.name)
  // A token caller also learns which team and role its token acts with.
  return { user, teams, token: token ? { teamId: token.teamId, role: token.role } : null }
})
