import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import type { Role } from '../../shared/utils/roles'
import { API_TOKEN_PREFIX } from '../../shared/utils/tokens'

export interface TokenCaller {
  user: { id: number; email: string; name: string }
  token: { id: number; teamId: number; role: Role }
}

/** last_used_at is written at most this often per token, so a busy script is not a write per request. */
const LAST_USED_EVERY_MS = 60_000

const unauthorized = (message: string) => createError({ statusCode: 401, statusMessage: message })

/**
 * The caller of a request that carries `Authorization: Bearer …`, or undefined when the
 * request has no Authorization header. A bad, revoked or expired token answers 401 at
 * once: it never falls back to the cookie.
 */
export async function bearerCaller(event: H3Event): Promise<TokenCaller | undefined> {
  const header = getRequestHeader(event, 'authorization')
  if (header === undefined) return undefined
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header)
  if (!m || !m[1]!.startsWith(API_TOKEN_PREFIX)) throw unauthorized(`Send an API token as "Authorization: Bearer ${API_TOKEN_PREFIX}…"`)
  const [row] = await useDb()
    .select({ token: tables.apiTokens, user: { id: tables.users.id, email: tables.users.email, name: tables.users.name } })
    .from(tables.apiTokens)
    .innerJoin(tables.users, eq(tables.users.id, tables.apiTokens.userId))
    .where(eq(tables.apiTokens.tokenHash, hashToken(m[1]!)))
    .limit(1)
  if (!row) throw unauthorized('This API token is not known')
  const now = Date.now()
  if (row.token.revokedAt) throw unauthorized('This API token was revoked')
  if (row.token.expiresAt && row.token.expiresAt.getTime() <= now) throw unauthorized('This API token has expired')
  if (!row.token.lastUsedAt || now - row.token.lastUsedAt.getTime() > LAST_USED_EVERY_MS) {
    await useDb().update(tables.apiTokens).set({ lastUsedAt: new Date(now) }).where(eq(tables.apiTokens.id, row.token.id))
  }
  return { user: row.user, token: { id: row.token.id, teamId: row.token.teamId, role: row.token.role } }
}
