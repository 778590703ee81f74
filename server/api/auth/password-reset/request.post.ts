import { eq } from 'drizzle-orm'
import { ResetRequestBody } from '../../../../shared/utils/validation'

const VALID_MINUTES = 60

/** Always answers the same, whether or not the address has an account. */
export default defineEventHandler(async (event) => {
  const { email } = await readValidatedBody(event, ResetRequestBody.parse)
  const [user] = await useDb().select().from(tables.users).where(eq(tables.users.email, email)).limit(1)
  if (user) {
    const { token, hash } = newToken()
    await useDb().insert(tables.passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt: new Date(Date.now() + VALID_MINUTES * 60_000) })
    await queueMail(mailWithLink({
      to: user.email,
      subject: 'Reset your Linewise password',
      lines: [`Hello ${user.name},`, `Someone asked to reset the password of your Linewise account. The link works once, for ${VALID_MINUTES} minutes.`, 'If it was not you, ignore this message; your password stays as it is.'],
      link: appUrl(`/reset-password?token=${token}`),
      action: 'Choose a new password',
    }))
  }
  return { ok: true, message: `If an account exists for ${email}, a reset link is on its way.` }
})
