/**
 * nuxt-auth-utils answers GET /api/_auth/session from the sealed cookie alone. A cookie
 * whose server-side session has ended (sign-out elsewhere, password reset, "sign out
 * everywhere") must not look signed in to the app either: the answer becomes 401 and the
 * cookie is cleared, so the page shows the sign-in form instead of failing later.
 */
export default defineNitroPlugin(() => {
  sessionHooks.hook('fetch', async (session, event) => {
    if (!session.user) return
    if (await sessionUser(event)) return
    await clearUserSession(event)
    throw createError({ statusCode: 401, statusMessage: 'Your session has ended; sign in again' })
  })
})
