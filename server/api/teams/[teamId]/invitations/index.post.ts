import { and, eq } from 'drizzle-orm'
import { ROLE_LABELS } from '../../../../../shared/utils/roles'
import { InviteBody, TeamParams } from '../../../../../shared/utils/validation'

export const INVITATION_DAYS = 7

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { user } = await requireTeamRole(event, teamId, 'manageTeam')
  const { email, role } = await readValidatedBody(event, InviteBody.parse)
  const db = useDb()
  const [member] = await db.select({ id: tables.users.id }).from(tables.users)
    .innerJoin(tables.memberships, and(eq(tables.memberships.userId, tables.users.id), eq(tables.memberships.teamId, teamId)))
    .where(eq(tables.users.email, email)).limit(1)
  if (member) throw createError({ statusCode: 409, statusMessage: `${email} is already a member of this team` })
  const [team] = await db.select().from(tables.teams).where(eq(tables.teams.id, teamId))
  const { token, hash } = newToken()
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 86_400_000)
  const id = firstId(await db.insert(tables.invitations).values({ teamId, email, role, tokenHash: hash, invitedBy: user.id, expiresAt }).$returningId())
  await audit({ teamId, actorId: user.id, action: 'invitation.created', subjectType: 'invitation', subjectId: id, details: { email, role } })
  try {
    await queueMail(mailWithLink({
      to: email,
      subject: `${user.name} invited you to ${team!.name} on Linewise`,
      lines: [`${user.name} invited you to join the team "${team!.name}" on Linewise as ${ROLE_LABELS[role]}.`, `The link works once and expires in ${INVITATION_DAYS} days.`],
      link: appUrl(`/invitations/${token}`),
      action: 'Accept the invitation',
    }))
  } catch (e) {
    // No mail, no invitation: the owner is told and can simply try again.
    await db.delete(tables.invitations).where(eq(tables.invitations.id, id))
    throw e
  }
  setResponseStatus(event, 201)
  return { id, email, role, expiresAt }
})
