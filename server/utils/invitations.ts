import { and, eq } from 'drizzle-orm'
import type { DbOrTx } from '../db/client'


/**
 * Finds an invitation by its token and says why it cannot be used, if so.
 * Expired, used and revoked links answer 410 with a reason a person can act on.
 */
export async function findInvitation(db: DbOrTx, token: string, lock = false) {
  const q = db.select({ inv: tables.invitations, teamName: tables.teams.name })
    .from(tables.invitations)
    .innerJoin(tables.teams, eq(tables.teams.id, tables.invitations.teamId))
    .where(and(eq(tables.invitations.tokenHash, hashToken(token))))
    .limit(1)
  const [row] = lock ? await q.for('update') : await q
  if (!row) throw createError({ statusCode: 404, statusMessage: 'This invitation link is not valid. Ask the team owner for a new one.' })
  const { inv } = row
  if (inv.acceptedAt) throw createError({ statusCode: 410, statusMessage: 'This invitation was already accepted. Sign in instead.' })
  if (inv.revokedAt) throw createError({ statusCode: 410, statusMessage: 'This invitation was withdrawn by the team owner.' })
  if (inv.expiresAt.getTime() < Date.now()) throw createError({ statusCode: 410, statusMessage: 'This invitation has expired. Ask the team owner for a new one.' })
  return row
}
