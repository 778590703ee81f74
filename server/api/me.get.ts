import { eq } from 'drizzle-orm'

/** The signed-in user and the teams they belong to, with their role in each. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const teams = await useDb()
    .select({ id: tables.teams.id, name: tables.teams.name, role: tables.memberships.role })
    .from(tables.memberships)
    .innerJoin(tables.teams, eq(tables.teams.id, tables.memberships.teamId))
    .where(eq(tables.memberships.userId, user.id))
    .orderBy(tables.teams.name)
  return { user, teams }
})
