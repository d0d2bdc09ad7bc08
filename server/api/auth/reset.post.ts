import { createHash } from 'node:crypto'
import { and, eq, gt, isNull, sql } from 'drizzle-orm'
import { passwordResets, users } from '../../db/schema'

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, resetSchema)
  const passwordHash = await hashPassword(input.password)
  const tokenHash = createHash('sha256').update(input.token).digest('hex')
  const db = await useDB()
  const user = await db.transaction(async (tx) => {
    // Claiming the token and using it are one conditional update: a second use finds nothing.
    const [reset] = await tx.update(passwordResets).set({ usedAt: new Date() })
      .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))
      .returning()
    if (!reset) return null
    const [updated] = await tx.update(users)
      .set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
      .where(eq(users.id, reset.userId)).returning()
    return updated ?? null
  })
  if (!user) {
    throw fieldError('token', 'this reset link has expired or has already been used; ask for a new one')
  }
  await clearSignInFailures(user.email)
  await signIn(event, user)
  return { id: user.id, email: user.email, name: user.name, role: user.role }
})
