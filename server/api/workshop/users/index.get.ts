import { asc } from 'drizzle-orm'
import { users } from '../../../db/schema'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const db = await useDB()
  return await db.select({ id: users.id, email: users.email, name: users.name, role: users.role, createdAt: users.createdAt })
    .from(users).orderBy(asc(users.id))
})
