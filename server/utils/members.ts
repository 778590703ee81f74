import { and, count, eq } from 'drizzle-orm'
import { z } from 'zod'
import type { Role } from '../../shared/utils/roles'
import { IdSchema } from '../../shared/utils/validation'
import type { Tx } from '../db/client'

export const MemberParams = z.object({ teamId: IdSchema, userId: IdSchema })


/**
 * The membership row (locked) of a user in a team, or 404; and refuses a change that would
 * leave the team without an owner.
 */
export async function lockMembership(tx: Tx, teamId: number, userId: number, newRole: Role | null) {
  const [m] = await tx.select().from(tables.memberships)
    .where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.userId, userId))).for('update')
  if (!m) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  if (m.role === 'owner' && newRole !== 'owner') {
    const [row] = await tx.select({ owners: count() }).from(tables.memberships)
      .where(and(eq(tables.memberships.teamId, teamId), eq(tables.memberships.role, 'owner'))).for('update')
    if ((row?.owners ?? 0) <= 1) throw createError({ statusCode: 409, statusMessage: 'A team needs at least one owner: make someone else owner first' })
  }
  return m
}
