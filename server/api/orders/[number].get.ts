import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { orders } from '../../db/schema'

const paramsSchema = z.object({ number: z.string().trim().min(1, 'number is required').max(40, 'number is too long') })
const querySchema = z.object({ t: z.string().max(100).optional() })

// Owner, maker, or a guest holding the signed link; anyone else gets the same 404 as for no order at all.
export default defineEventHandler(async (event) => {
  const { number } = paramsWith(event, paramsSchema)
  const { t } = queryWith(event, querySchema)
  const user = await currentUser(event)
  const db = await useDB()
  const [order] = await db.select().from(orders).where(eq(orders.number, number.toUpperCase()))
  const allowed = order && (
    user?.role === 'maker'
    || (user && order.userId === user.id)
    || (t !== undefined && orderAccessTokenValid(order.number, t))
  )
  if (!order || !allowed) throw notFoundError('No such order.')
  return await orderView(db, order)
})
