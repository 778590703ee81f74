/** "Sign out everywhere": every session of the caller ends, this one included. API tokens stay (they are listed on the team page). */
export default defineEventHandler(async (event) => {
  const user = await requireSessionUser(event)
  const ended = await endUserSessions(user.id)
  await audit({ teamId: null, actorId: user.id, action: 'user.signed_out_everywhere', subjectType: 'user', subjectId: user.id, details: { sessions: ended } })
  await clearUserSession(event)
  return { ended }
})
