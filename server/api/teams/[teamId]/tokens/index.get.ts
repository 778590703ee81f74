import { and, desc, eq } from 'drizzle-orm'
import { TeamParams } from '../../../../../shared/utils/validation'

/** The caller's API tokens in this team; an owner sees every member's. Never the token itself. */
export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { user, role } = await requireTeamRole(event, teamId, 'view')
  const t = tables.apiTokens
  const where = role === 'owner' ? eq(t.teamId, teamId) : and(eq(t.teamId, teamId), eq(t.userId, user.id))
  const rows = await useDb()
    .select({ id: t.id, name: t.name, role: t.role, userId: t.userId, userName: tables.users.name, createdAt: t.createdAt, expiresAt: t.expiresAt, lastUsedAt: t.lastUsedAt, revokedAt: t.revokedAt })
    .from(t).innerJoin(tables.users, eq(tables.users.id, t.userId))
    .where(where).orderBy(desc(t.createdAt)).limit(500)
  return rows.map((r) => ({ ...r, mine: r.userId === user.id }))
})
