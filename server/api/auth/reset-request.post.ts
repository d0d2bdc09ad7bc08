import { createHash, randomBytes } from 'node:crypto'
import { sql } from 'drizzle-orm'
import { passwordResets, users } from '../../db/schema'

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, resetRequestSchema)
  await logResetRequest(event, input.email)
  const config = useRuntimeConfig(event)
  const db = await useDB()
  const [user] = await db.select().from(users).where(sql`lower(${users.email}) = ${input.email}`).limit(1)
  if (user) {
    const token = randomBytes(32).toString('base64url')
    const ttlSeconds = Number(config.resetTtlSeconds)
    await db.transaction(async (tx) => {
      await tx.insert(passwordResets).values({
        tokenHash: createHash('sha256').update(token).digest('hex'),
        userId: user.id,
        expiresAt: new Date(Date.now() + ttlSeconds * 1000),
      })
      await queueMail(tx, {
        to: user.email,
        subject: 'Reset your Groovewright password',
        content: {
          heading: 'A new password for your account',
          paragraphs: [
            `Someone (we hope you) asked to reset the password of ${user.email}. The link below works once, for ${Math.round(ttlSeconds / 60)} minutes, and only until you ask for another.`,
            'If you did not ask for this, ignore this message: your password stays as it is.',
          ],
          action: { label: 'Choose a new password', url: `${config.siteUrl}/reset?token=${token}` },
        },
      })
    })
  }
  // The same answer whether or not the address has an account, so nobody can probe for accounts.
  return { sent: true }
})
