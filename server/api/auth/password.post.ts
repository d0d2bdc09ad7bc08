import { eq, sql } from 'drizzle-orm'
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
  // A new session version signs out every other browser that held the old password.
  const [updated] = await db.update(users)
    .set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
    .where(eq(users.id, user.id)).returning()
  await signIn(event, updated!)
  return { changed: true }
})
