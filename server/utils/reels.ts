import type { H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import type { Permission, Role } from '../../shared/utils/roles'
import type { Db } from '../db/client'

/** A reel the user can reach with the permission (joined through their membership), else 404/403. */
export async function requireReel(event: H3Event, reelId: number, permission: Permission) {
  const user = await requireUser(event)
  const [row] = await useDb()
    .select({ reel: tables.reels, role: tables.memberships.role })
    .from(tables.reels)
    .innerJoin(tables.memberships, and(eq(tables.memberships.teamId, tables.reels.teamId), eq(tables.memberships.userId, user.id)))
    .where(eq(tables.reels.id, reelId))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  assertCan(row.role, permission)
  return { user, role: row.role as Role, reel: row.reel }
}

/** A frame the user can reach with the permission, else 404/403. */
export async function requireFrame(event: H3Event, frameId: number, permission: Permission) {
  const user = await requireUser(event)
  const [row] = await useDb()
    .select({ frame: tables.frames, role: tables.memberships.role })
    .from(tables.frames)
    .innerJoin(tables.memberships, and(eq(tables.memberships.teamId, tables.frames.teamId), eq(tables.memberships.userId, user.id)))
    .where(eq(tables.frames.id, frameId))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  assertCan(row.role, permission)
  return { user, role: row.role as Role, frame: row.frame }
}

/**
 * Refuses changes to a reel that has been signed off (read-only until an owner reopens it).
 * Inside a transaction the reel row is locked, so a sign-off (which locks it too) cannot
 * slip in between this check and the change.
 */
export async function assertReelOpen(reelId: number, tx?: Pick<Db, 'select'>) {
  const q = (tx ?? useDb()).select({ signedAt: tables.reels.signedAt }).from(tables.reels).where(eq(tables.reels.id, reelId)).limit(1)
  // MariaDB has no FOR SHARE; an update lock serialises decisions on one reel, which is cheap.
  const [reel] = tx ? await q.for('update') : await q
  if (!reel) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  if (reel.signedAt) {
    throw createError({ statusCode: 409, statusMessage: 'This reel is signed off and read-only; an owner can reopen it' })
  }
}
