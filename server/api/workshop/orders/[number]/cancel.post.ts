import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { orders } from '../../../../db/schema'

const paramsSchema = z.object({ number: z.string().trim().min(1).max(40) })

// Only an unpaid order can be cancelled here; a paid one is refunded instead.
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const db = await useDB()
  const [order] = await db.select().from(orders).where(eq(orders.number, number))
  if (!order) throw notFoundError('No such order.')
  // The maker is told when there is nothing left to cancel (the customer's own route answers calmly instead).
  if (order.status !== 'awaiting_payment') throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `Only an unpaid order can be cancelled; this one is ${order.status}.` })
  return await cancelUnpaidOrder(order, 'Cancelled by the workshop.', maker.id)
})
