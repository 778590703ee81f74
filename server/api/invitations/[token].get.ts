import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { TokenSchema } from '../../../shared/utils/validation'

const Params = z.object({ token: TokenSchema })

/** What the accept page needs to show; public, since the token is the credential. */
export default defineEventHandler(async (event) => {
  const { token } = await getValidatedRouterParams(event, Params.parse)
  const { inv, teamName } = await findInvitation(useDb(), token)
  const [existing] = await useDb().select({ id: tables.users.id }).from(tables.users).where(eq(tables.users.email, inv.email)).limit(1)
  const signedIn = await sessionUser(event)
  return {
    teamName,
    email: inv.email,
    role: inv.role,
    expiresAt: inv.expiresAt,
    hasAccount: !!existing,
    signedInAs: signedIn?.email ?? null,
  }
})
