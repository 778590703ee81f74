import { eq } from 'drizzle-orm'
import { AcceptInvitationBody } from '../../../shared/utils/validation'

/**
 * Joins the team with the invited role. A new address sets its name and password here;
 * an existing account must be signed in as the invited address.
 */
export default defineEventHandler(async (event) => {
  const { token, name, password } = await readValidatedBody(event, AcceptInvitationBody.parse)
  const signedIn = await sessionUser(event)
  const passwordHash = password ? await hashPassword(password) : null
  const result = await useDb().transaction(async (tx) => {
    const { inv } = await findInvitation(tx, token, true)
    let [user] = await tx.select().from(tables.users).where(eq(tables.users.email, inv.email)).limit(1)
    if (user) {
      if (signedIn?.id !== user.id) {
        throw createError({ statusCode: 409, statusMessage: `An account for ${inv.email} exists: sign in as ${inv.email}, then open the link again.` })
      }
    } else {
      if (!name || !passwordHash) throw createError({ statusCode: 400, statusMessage: 'Enter your name and a password to create your account' })
      const id = firstId(await tx.insert(tables.users).values({ email: inv.email, name, passwordHash }).$returningId())
      ;[user] = await tx.select().from(tables.users).where(eq(tables.users.id, id))
    }
    await tx.insert(tables.memberships).values({ teamId: inv.teamId, userId: user!.id, role: inv.role })
      .onDuplicateKeyUpdate({ set: { role: inv.role } })
    await tx.update(tables.invitations).set({ acceptedAt: new Date() }).where(eq(tables.invitations.id, inv.id))
    await audit({ teamId: inv.teamId, actorId: user!.id, action: 'invitation.accepted', subjectType: 'invitation', subjectId: inv.id, details: { role: inv.role } }, tx)
    return { user: user!, teamId: inv.teamId, role: inv.role }
  })
  await startSession(event, result.user)
  return { teamId: result.teamId, role: result.role }
})
