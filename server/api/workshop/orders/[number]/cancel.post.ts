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
  if (!order) throw createError({ statusCode: 404, statusMessage: 'Not found', message: 'No such order.' })
  if (order.status !== 'awaiting_payment') throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `Only an unpaid order can be cancelled; this one is ${order.status}.` })
  if (order.checkoutSessionId) {
    // Close the payment page first, so the customer cannot pay for a cancelled order.
    const closed = await useStripe().checkout.sessions.expire(order.checkoutSessionId).then(() => true, () => false)
    if (!closed) {
      const session = await useStripe().checkout.sessions.retrieve(order.checkoutSessionId).catch(() => null)
      if (session?.status === 'complete') throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'The customer has just paid for this order; it will show as paid in a moment. Refund it instead if needed.' })
      if (session?.status !== 'expired') throw createError({ statusCode: 502, statusMessage: 'Payment service error', message: 'The payment page could not be closed, so the order was not cancelled; try again in a minute.' })
    }
  }
  const cancelled = await db.transaction(async (tx) => {
    const moved = await moveOrder(tx, order.id, ['awaiting_payment'], 'cancelled', {}, 'Cancelled by the workshop.', maker.id)
    if (moved) await returnStock(tx, order.id)
    return moved
  })
  if (cancelled) return { number: cancelled.number, status: cancelled.status }
  // Closing the payment page sends its own expiry event, which may have cancelled the order first.
  const [now] = await db.select({ number: orders.number, status: orders.status }).from(orders).where(eq(orders.id, order.id))
  if (now?.status === 'cancelled') return now
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'The order changed meanwhile (perhaps it was just paid); reload it.' })
})
