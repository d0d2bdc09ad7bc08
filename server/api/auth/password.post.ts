import { eq } from 'drizzle-orm'
import { users } from '../../db/schema'

export default defineEventHandler(async (event) => {
  const sessionUser = await requireRole(event)
  const input = await readBodyWith(event, passwordChangeSchema)
  const db = await useDB()
  const [user] = await db.select().from(users).where(eq(users.id, sessionUser.id)).limit(1)
  if (!user || !await verifyPassword(user.passwordHash, input.currentPassword)) {
    throw fieldError('currentPassword', 'the current password is not right')
  }
  const passwordHash = await hashPassword(input.newPassword)
  await db.transaction(async (tx) => {
    await tx.update(users).set({ passwordHash, updatedAt: new Date() }).where(eq(users.id, user.id))
    // Every browser that held the old password is signed out, and unused reset links die with it.
    await endSessionsAndResetLinks(tx, user.id)
  })
  // The person who just proved the password stays signed in here, on a new session.
  await signIn(event, user)
  return { changed: true }
})
