import { createHash } from 'node:crypto'
import { and, eq, gt, gte, isNull, ne, notExists, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/pg-core'
import { passwordResets, users } from '../../db/schema'

// Another link of the same user, asked for at the same moment or later (it may be used already).
const newer = alias(passwordResets, 'newer')

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, resetSchema)
  const passwordHash = await hashPassword(input.password)
  const tokenHash = createHash('sha256').update(input.token).digest('hex')
  const db = await useDB()
  const user = await db.transaction(async (tx) => {
    // Claiming the token and using it are one conditional update: a second use finds nothing. Only the
    // user's newest link works, so asking for (or using) a new one ends every older link.
    const [reset] = await tx.update(passwordResets).set({ usedAt: new Date() })
      .where(and(
        eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date()),
        notExists(tx.select({ one: sql`1` }).from(newer).where(and(
          eq(newer.userId, passwordResets.userId), ne(newer.tokenHash, passwordResets.tokenHash), gte(newer.createdAt, passwordResets.createdAt),
        ))),
      ))
      .returning()
    if (!reset) return null
    const [updated] = await tx.update(users).set({ passwordHash, updatedAt: new Date() })
      .where(eq(users.id, reset.userId)).returning()
    if (updated) await endSessionsAndResetLinks(tx, updated.id)
    return updated ?? null
  })
  if (!user) {
    throw fieldError('token', 'this reset link has expired, has been used or was replaced by a newer one; ask for a new one')
  }
  await clearSignInFailures(user.email)
  await signIn(event, user)
  return { id: user.id, email: user.email, name: user.name, role: user.role }
})
