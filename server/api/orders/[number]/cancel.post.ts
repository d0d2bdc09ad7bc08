import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { orders } from '../../../db/schema'

const paramsSchema = z.object({ number: z.string().trim().min(1, 'number is required').max(40, 'number is too long') })
const bodySchema = z.object({ t: z.string({ error: 't must be text' }).max(100, 't is too long').optional() })

/**
 * The customer gives up an unpaid order (they pressed Cancel on the payment page): the page is closed
 * and the held stock goes back on sale now rather than when the hold runs out. Owner or holder of the
 * signed link only; anyone else gets the same 404 as for no order. Asking again, or after the expiry
 * event got there first, answers the same `cancelled`, so a double click is harmless.
 */
export default defineEventHandler(async (event) => {
  const { number } = paramsWith(event, paramsSchema)
  const { t } = await readBodyWith(event, bodySchema)
  const user = await currentUser(event)
  const db = await useDB()
  const [order] = await db.select().from(orders).where(eq(orders.number, number.toUpperCase()))
  const allowed = order && ((user && order.userId === user.id) || (t !== undefined && orderAccessTokenValid(order.number, t)))
  if (!order || !allowed) throw notFoundError('No such order.')
  return await cancelUnpaidOrder(order, 'Given up by the customer on leaving the payment page.')
})
