// Sign out everywhere: for a lost phone or a shared computer left signed in. This browser too.
export default defineEventHandler(async (event) => {
  const user = await requireRole(event)
  const db = await useDB()
  await endAllSessions(db, user.id)
  await signOut(event)
  return { signedOut: true }
})
