import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import type { Permission } from '../../shared/utils/roles'
import type { Db } from '../db/client'

/** A reel the user can reach with the permission, else 404/403. */
export async function requireReel(event: H3Event, reelId: number, permission: Permission) {
  const { row, ...rest } = await requireTeamRow(event, tables.reels, reelId, permission)
  return { ...rest, reel: row }
}

/** A frame the user can reach with the permission, else 404/403. */
export async function requireFrame(event: H3Event, frameId: number, permission: Permission) {
  const { row, ...rest } = await requireTeamRow(event, tables.frames, frameId, permission)
  return { ...rest, frame: row }
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
