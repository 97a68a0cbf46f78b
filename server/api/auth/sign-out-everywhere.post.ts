export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  await revokeAllSessions(user.id)
  await clearUserSession(event)
  return { ok: true }
})
