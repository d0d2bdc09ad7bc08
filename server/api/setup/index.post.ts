// Make the shop's first maker account with the setup code the server printed (server/utils/account/setup.ts).
import { users } from '../../db/schema'

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, setupSchema)
  const db = await useDB()
  const done = () => conflictError('This shop has its maker already: sign in instead.')
  if (await makerExists(db)) throw done()
  if (!setupCodeMatches(input.code)) throw fieldError('code', 'this is not the setup code: copy the link again from the server\'s log')
  const passwordHash = await hashPassword(input.password)
  const outcome = await db.transaction(async (tx) => {
    await lockUsersForSetup(tx)
    if (await makerExists(tx)) return 'done' as const
    const [created] = await tx.insert(users)
      .values({ email: input.email, name: input.name, passwordHash, role: 'maker' })
      .onConflictDoNothing()
      .returning()
    return created ?? 'taken' as const
  })
  if (outcome === 'done') throw done()
  if (outcome === 'taken') {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'email: an account with this e-mail already exists; use another address for the maker.', data: { fields: { email: 'an account with this e-mail already exists' } } })
  }
  await signIn(event, outcome)
  setResponseStatus(event, 201)
  return { id: outcome.id, email: outcome.email, name: outcome.name, role: outcome.role }
})
