declare module '#app' {
  interface PageMeta {
    /** false: open to everyone (sign-in, invitation, reset pages). Default: signed-in only. */
    auth?: boolean
  }
}

export default defineNuxtRouteMiddleware(async (to) => {
  if (to.meta.auth === false) return
  const { loggedIn, user, clear } = useUserSession()
  const toLogin = () => navigateTo({ path: '/login', query: to.fullPath === '/' ? {} : { redirect: to.fullPath } })
  if (!loggedIn.value || !user.value) return toLogin()
  try {
    await useTeamStore().ensure(user.value.id)
  } catch (e) {
    // The cookie outlived the account or its session on the server: start over cleanly.
    if (errorStatus(e) === 401) {
      await clear()
      return toLogin()
    }
    throw createError({ statusCode: errorStatus(e) || 503, statusMessage: errorMessage(e, 'Your teams could not be loaded.'), fatal: true })
  }
})
