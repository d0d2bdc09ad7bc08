import { sql } from 'drizzle-orm'

// Answers once the database is open, migrated and seeded: the launcher and the tests wait for it.
export default defineEventHandler(async () => {
  await startupDone()
  const db = await useDB()
  await db.execute(sql`select 1`)
  return { ok: true }
})
