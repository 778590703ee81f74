import { eq } from 'drizzle-orm'
import { LoginBody } from '../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { email, password } = await readValidatedBody(event, LoginBody.parse)
  await assertSigninAllowed(event, email)
  const [user] = await useDb().select().from(tables.users).where(eq(tables.users.email, email)).limit(1)
  // Verify against a hash even when the account is unknown, so timing does not reveal it.
  const ok = await verifyPassword(user?.passwordHash ?? (dummyHash ??= await hashPassword('no account has this password')), password)
  if (!user || !ok) {
    await recordSigninFailure(event, email)
    throw createError({ statusCode: 401, statusMessage: 'E-mail or password is wrong' })
  }
  await clearSigninFailures(event, email)
  await startSession(event, user)
  return { id: user.id, email: user.email, name: user.name }
})

let dummyHash: string | undefined
