import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { orders, paymentEvents, refunds } from '../../../../db/schema'

const paramsSchema = z.object({ number: z.string().trim().min(1).max(40) })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const db = await useDB()
  const [order] = await db.select().from(orders).where(eq(orders.number, number))
  if (!order) throw createError({ statusCode: 404, statusMessage: 'Not found', message: 'No such order.' })
  const refundRows = await db.select().from(refunds).where(eq(refunds.orderId, order.id)).orderBy(refunds.id)
  const events = await db.select().from(paymentEvents).where(eq(paymentEvents.orderId, order.id)).orderBy(paymentEvents.receivedAt)
  return {
    ...await orderView(db, order),
    paymentIntentId: order.paymentIntentId,
    paymentEvents: events.map(row => ({ type: row.type, outcome: row.outcome, receivedAt: row.receivedAt })),
    refunds: refundRows.map(row => ({ id: row.id, amountMinor: row.amountMinor, reason: row.reason, restock: row.restock, status: row.status, createdAt: row.createdAt })),
  }
})
