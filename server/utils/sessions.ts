import type { H3Event } from 'h3'
import { and, eq, gt, isNull, lt, ne } from 'drizzle-orm'
import { randomBytes } from 'node:crypto'

type SessionUser = { id: number; email: string; name: string }

/** How long a session lives on the server; the cookie's max age is the same. */
export const SESSION_DAYS = 7

/**
 * Signs a browser in: a new server-side session (a fresh id at every sign-in, so an id
 * planted before sign-in is worth nothing) whose random id rides in the sealed cookie's
 * server-only part. The session the cookie held before, if any, is ended.
 */
export async function startSession(event: H3Event, user: SessionUser) {
  await endCurrentSession(event)
  // Ended and expired sessions are kept only as long as a live one could be: the table stays small.
  await useDb().delete(tables.sessions).where(and(eq(tables.sessions.userId, user.id), lt(tables.sessions.expiresAt, new Date())))
  const sid = randomBytes(32).toString('base64url')
  await useDb().insert(tables.sessions).values({
    userId: user.id, tokenHash: hashToken(sid), userAgent: (getRequestHeader(event, 'user-agent') ?? '').slice(0, 255),
    expiresAt: new Date(Date.now() + SESSION_DAYS * 86_400_000),
  })
  await replaceUserSession(event, { user: { id: user.id, email: user.email, name: user.name }, loggedInAt: Date.now(), secure: { sid } })
}

const sidOf = (session: { secure?: { sid?: unknown } }) => (typeof session.secure?.sid === 'string' ? session.secure.sid : null)

/**
 * The user of a cookie whose server-side session is still open, else null. One lookup by
 * a unique index; a cookie sealed before sessions were recorded (no id) counts as ended.
 */
export async function sessionUser(event: H3Event): Promise<SessionUser | null> {
  const session = await getUserSession(event)
  const sid = sidOf(session)
  const user = session.user as SessionUser | undefined
  if (!sid || !user) return null
  const [row] = await useDb().select({ userId: tables.sessions.userId }).from(tables.sessions)
    .where(and(eq(tables.sessions.tokenHash, hashToken(sid)), isNull(tables.sessions.revokedAt), gt(tables.sessions.expiresAt, new Date())))
    .limit(1)
  return row && row.userId === user.id ? user : null
}

/** Ends this browser's session on the server and clears its cookie. */
export async function endCurrentSession(event: H3Event) {
  const sid = sidOf(await getUserSession(event))
  if (sid) await useDb().update(tables.sessions).set({ revokedAt: new Date() }).where(and(eq(tables.sessions.tokenHash, hashToken(sid)), isNull(tables.sessions.revokedAt)))
  await clearUserSession(event)
}

/** Ends every open session of a user (optionally all but the caller's own); returns how many. */
export async function endUserSessions(userId: number, tx: Pick<ReturnType<typeof useDb>, 'update'> = useDb(), exceptSid?: string | null) {
  const where = [eq(tables.sessions.userId, userId), isNull(tables.sessions.revokedAt)]
  if (exceptSid) where.push(ne(tables.sessions.tokenHash, hashToken(exceptSid)))
  const [res] = await tx.update(tables.sessions).set({ revokedAt: new Date() }).where(and(...where))
  return (res as { affectedRows?: number }).affectedRows ?? 0
}
