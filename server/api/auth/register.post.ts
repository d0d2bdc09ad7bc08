import { users } from '../../db/schema'

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, registerSchema)
  const passwordHash = await hashPassword(input.password)
  const db = await useDB()
  const siteUrl = String(useRuntimeConfig(event).siteUrl)
  const user = await db.transaction(async (tx) => {
    const [created] = await tx.insert(users)
      .values({ email: input.email, name: input.name, passwordHash, role: 'collector' })
      // The only unique key a new row can collide on is the case-insensitive e-mail.
      .onConflictDoNothing()
      .returning()
    if (!created) return null
    await queueMail(tx, {
      to: created.email,
      subject: 'Welcome to Groovewright',
      dedupeKey: `welcome:${created.id}`,
      content: {
        heading: `Welcome, ${created.name}`,
        paragraphs: [
          'Your collector account is ready. You can follow your orders, hear and approve proofs of personal messages, and keep your addresses in one place.',
          'Wax cylinders are fragile and soften in heat: our care guide explains how to store and play them.',
        ],
        action: { label: 'Open your account', url: `${siteUrl}/account` },
      },
    })
    return created
  })
  if (!user) {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'email: an account with this e-mail already exists; sign in or reset your password.', data: { fields: { email: 'an account with this e-mail already exists' } } })
  }
  await signIn(event, user)
  setResponseStatus(event, 201)
  return { id: user.id, email: user.email, name: user.name, role: user.role }
})
