import { sql } from 'drizzle-orm'
import { users } from '../../db/schema'

// Compared against when the e-mail is unknown, so a wrong address costs the same time as a wrong password.
let decoyHash: Promise<string> | undefined

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, loginSchema)
  const user = await throttledSignIn(event, input.email, async () => {
    const db = await useDB()
    const [found] = await db.select().from(users).where(sql`lower(${users.email}) = ${input.email}`).limit(1)
    decoyHash ??= hashPassword('decoy-password-for-timing')
    const valid = await verifyPassword(found?.passwordHash ?? await decoyHash, input.password)
    return found && valid ? found : null
  })
  if (!user) {
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'The e-mail or the password is not right.' })
  }
  await signIn(event, user)
  return { id: user.id, email: user.email, name: user.name, role: user.role }
})
