import { eq } from 'drizzle-orm'
import { ResetRequestBody } from '../../../../shared/utils/validation'

const VALID_MINUTES = 60

/**
 * Always answers the same, whether or not the address has an account, and after the same
 * work: the throttle counts the address either way, and the lookup, the link and the mail
 * happen after the answer has gone, so its timing cannot tell a known account from an
 * unknown one.
 */
export default defineEventHandler(async (event) => {
  const { email } = await readValidatedBody(event, ResetRequestBody.parse)
  await consumeResetRequest(event, email)
  sendResetLink(email).catch((e) => console.error('[password reset] not sent:', (e as Error).message))
  return { ok: true, message: `If an account exists for ${email}, a reset link is on its way.` }
})

async function sendResetLink(email: string) {
  const [user] = await useDb().select().from(tables.users).where(eq(tables.users.email, email)).limit(1)
  if (!user) return
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
