import { and, count, eq, ne, sql } from 'drizzle-orm'
import { users } from '../../../db/schema'

export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const { role } = await readBodyWith(event, roleChangeSchema)
  const db = await useDB()
  const updated = await db.transaction(async (tx) => {
    // Lock the makers so that two demotions at once cannot leave the shop without one.
    await tx.execute(sql`select id from users where role = 'maker' for update`)
    const [target] = await tx.select().from(users).where(eq(users.id, id)).limit(1)
    if (!target) throw notFoundError('No such user.')
    if (target.role === 'maker' && role !== 'maker') {
      const [others] = await tx.select({ n: count() }).from(users).where(and(eq(users.role, 'maker'), ne(users.id, id)))
      if ((others?.n ?? 0) === 0) {
        throw conflictError('role: at least one maker must remain; make someone else a maker first.')
      }
    }
    if (target.role === role) return target
    const [row] = await tx.update(users).set({ role, updatedAt: new Date() }).where(eq(users.id, id)).returning()
    return row!
  })
  if (updated.id === maker.id) event.context.currentUser = undefined
  return { id: updated.id, email: updated.email, name: updated.name, role: updated.role }
})
