/** Ends this browser's session on the server too: a copy of the cookie is worth nothing afterwards. */
export default defineEventHandler(async (event) => {
  await endCurrentSession(event)
  return { ok: true }
})
