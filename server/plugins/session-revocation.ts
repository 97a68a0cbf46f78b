// Whatever clears the cookie (our sign-out or the module's own DELETE /api/_auth/session) also revokes the row.
export default defineNitroPlugin(() => {
  sessionHooks.hook('clear', async (session) => {
    if (session?.sessionId) await revokeSession(session.sessionId)
  })
})
