import { and, desc, eq, gt, isNull } from 'drizzle-orm'
import { TeamParams } from '../../../../../shared/utils/validation'

/** Invitations still open (not accepted, revoked or expired). */
export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  await requireTeamRole(event, teamId, 'manageTeam')
  return useDb()
    .select({ id: tables.invitations.id, email: tables.invitations.email, role: tables.invitations.role, expiresAt: tables.invitations.expiresAt, createdAt: tables.invitations.createdAt })
    .from(tables.invitations)
    .where(and(eq(tables.invitations.teamId, teamId), isNull(tables.invitations.acceptedAt), isNull(tables.invitations.revokedAt), gt(tables.invitations.expiresAt, new Date())))
    .orderBy(desc(tables.invitations.createdAt))
})
