import type { H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import type { Permission, Role } from '../../shared/utils/roles'
import { can, ROLE_LABELS } from '../../shared/utils/roles'
import { roleWithin } from '../../shared/utils/tokens'
import type { TokenCaller } from './api-tokens'

type Caller = { user: { id: number; email: string; name: string }; token?: TokenCaller['token'] }

/**
 * Who sent the request: an API token (Authorization: Bearer) or a browser session that is
 * still open on the server. Found once per request.
 */
export async function requireCaller(event: H3Event): Promise<Caller> {
  const known = event.context.caller as Caller | undefined
  if (known) return known
  const bearer = await bearerCaller(event)
  const caller: Caller | null = bearer ?? (await sessionUser(event).then((user) => (user ? { user } : null)))
  if (!caller) throw createError({ statusCode: 401, statusMessage: 'Sign in first' })
  event.context.caller = caller
  return caller
}

/** The signed-in user (by session or API token), or 401. */
export async function requireUser(event: H3Event) {
  return (await requireCaller(event)).user
}

/** Routes that manage sessions and tokens take a browser session only: a token cannot mint or extend tokens. */
export async function requireSessionUser(event: H3Event) {
  const caller = await requireCaller(event)
  if (caller.token) throw createError({ statusCode: 403, statusMessage: 'API tokens cannot do this; sign in with your password' })
  return caller.user
}

/**
 * A token acts in its own team only (another team answers 404, as a missing one), with the
 * permissions its role and its maker's current role both hold.
 */
function tokenRole(caller: Caller, teamId: number, memberRole: Role): Role {
  const token = caller.token
  if (!token) return memberRole
  if (token.teamId !== teamId) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  if (!roleWithin(token.role, memberRole)) {
    throw createError({ statusCode: 403, statusMessage: `This API token has the role ${ROLE_LABELS[token.role]}, more than your role in this team now (${ROLE_LABELS[memberRole]}); make a new token` })
  }
  return token.role
}

/**
 * Session first, then team membership, then the permission. A team the user does not
 * belong to answers 404, exactly as a team that does not exist, so ids reveal nothing.
 */
export async function requireTeamRole(event: H3Event, teamId: number, permission: Permission) {
  const caller = await requireCaller(event)
  if (caller.token && caller.token.teamId !== teamId) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const [m] = await useDb()
    .select({ role: tables.memberships.role })
    .from(tables.memberships)
    .where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.userId, caller.user.id)))
    .limit(1)
  if (!m) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const role = tokenRole(caller, teamId, m.role)
  assertCan(role, permission)
  return { user: caller.user, role, teamId }
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
  const caller = await requireCaller(event)
  // The three tables share id and team_id; drizzle's builder wants one concrete table type.
  const t = table as typeof tables.reels
  const [found] = await useDb()
    .select({ row: t, role: tables.memberships.role })
    .from(t)
    .innerJoin(tables.memberships, and(eq(tables.memberships.teamId, t.teamId), eq(tables.memberships.userId, caller.user.id)))
    .where(eq(t.id, id))
    .limit(1)
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const role = tokenRole(caller, found.row.teamId, found.role)
  assertCan(role, permission)
  return { user: caller.user, role, row: found.row as unknown as T['$inferSelect'] }
}

/** A production the user can see with the given permission, or 404 / 403. */
export async function requireProduction(event: H3Event, productionId: number, permission: Permission) {
  const { row, ...rest } = await requireTeamRow(event, tables.productions, productionId, permission)
  return { ...rest, production: row }
}
