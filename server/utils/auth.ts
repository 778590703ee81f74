import type { H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import type { Permission, Role } from '../../shared/utils/roles'
import { can, ROLE_LABELS } from '../../shared/utils/roles'

/** The signed-in user, or 401. */
export async function requireUser(event: H3Event) {
  const { user } = await requireUserSession(event, { statusCode: 401, message: 'Sign in first' })
  return user as { id: number; email: string; name: string }
}

/**
 * Session first, then team membership, then the permission. A team the user does not
 * belong to answers 404, exactly as a team that does not exist, so ids reveal nothing.
 */
export async function requireTeamRole(event: H3Event, teamId: number, permission: Permission) {
  const user = await requireUser(event)
  const [m] = await useDb()
    .select({ role: tables.memberships.role })
    .from(tables.memberships)
    .where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.userId, user.id)))
    .limit(1)
  if (!m) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  assertCan(m.role, permission)
  return { user, role: m.role as Role, teamId }
}

export function assertCan(role: Role, permission: Permission) {
  if (!can(role, permission)) {
    throw createError({ statusCode: 403, statusMessage: `Your role (${ROLE_LABELS[role]}) cannot do this` })
  }
}

type TeamScopedTable = typeof tables.productions | typeof tables.reels | typeof tables.frames | typeof tables.deliverySpecs

/**
 * A row of a team-scoped table that the user can reach with the permission, found through
 * their membership in one query: another team's row answers 404, exactly as a missing one.
 */
export async function requireTeamRow<T extends TeamScopedTable>(event: H3Event, table: T, id: number, permission: Permission) {
  const user = await requireUser(event)
  // The three tables share id and team_id; drizzle's builder wants one concrete table type.
  const t = table as typeof tables.reels
  const [found] = await useDb()
    .select({ row: t, role: tables.memberships.role })
    .from(t)
    .innerJoin(tables.memberships, and(eq(tables.memberships.teamId, t.teamId), eq(tables.memberships.userId, user.id)))
    .where(eq(t.id, id))
    .limit(1)
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  assertCan(found.role, permission)
  return { user, role: found.role as Role, row: found.row as unknown as T['$inferSelect'] }
}

/** A production the user can see with the given permission, or 404 / 403. */
export async function requireProduction(event: H3Event, productionId: number, permission: Permission) {
  const { row, ...rest } = await requireTeamRow(event, tables.productions, productionId, permission)
  return { ...rest, production: row }
}
