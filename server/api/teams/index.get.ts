import { eq } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  return useDb()
    .select({ id: tables.teams.id, name: tables.teams.name, role: tables.memberships.role })
    .from(tables.memberships)
    .innerJoin(tables.teams, eq(tables.teams.id, tables.memberships.teamId))
    .where(eq(tables.memberships.userId, user.id))
    .orderBy(tables.teams.name)
})
