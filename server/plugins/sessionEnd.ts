// nuxt-auth-utils also answers DELETE /api/_auth/session by clearing the cookie alone. The session's row
// ends with it, so a copy of that cookie signs nobody in afterwards, whichever way the session was left.
export default defineNitroPlugin(() => {
  sessionHooks.hook('clear', async (session) => {
    const sessionId = (session.secure as { sessionId?: unknown } | undefined)?.sessionId
    if (typeof sessionId === 'string') await endSession(sessionId)
  })
})
