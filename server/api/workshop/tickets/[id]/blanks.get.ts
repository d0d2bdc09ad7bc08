import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { tickets } from '../../../../db/schema'

const querySchema = z.object({ q: z.string().trim().toUpperCase().max(40, 'q is too long').optional() })

/** The blanks this ticket may take (the picker): its format, tested and passed on the current surface, held by no open ticket. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const { q } = queryWith(event, querySchema)
  const db = await useDB()
  const [ticket] = await db.select({ format: tickets.format }).from(tickets).where(eq(tickets.id, id))
  if (!ticket) throw notFoundError('No such ticket.')
  return { format: ticket.format, blanks: await eligibleBlanks(db, ticket.format, { code: q || undefined }) }
})
