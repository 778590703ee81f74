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

/** A production the user can see with the given permission, or 404 / 403. */
export async function requireProduction(event: H3Event, productionId: number, permission: Permission) {
  const user = await requireUser(event)
  const [row] = await useDb()
    .select({ production: tables.productions, role: tables.memberships.role })
    .from(tables.productions)
    .innerJoin(tables.memberships, and(eq(tables.memberships.teamId, tables.productions.teamId), eq(tables.memberships.userId, user.id)))
    .where(eq(tables.productions.id, productionId))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  assertCan(row.role, permission)
  return { user, role: row.role as Role, production: row.production }
}
