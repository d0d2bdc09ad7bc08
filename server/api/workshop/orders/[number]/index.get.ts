import { eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { orderItems, orders, paymentEvents, refundItems, refunds } from '../../../../db/schema'

const paramsSchema = z.object({ number: z.string().trim().min(1).max(40) })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const db = await useDB()
  const [order] = await db.select().from(orders).where(eq(orders.number, number))
  if (!order) throw notFoundError('No such order.')
  const refundRows = await db.select().from(refunds).where(eq(refunds.orderId, order.id)).orderBy(refunds.id)
  const events = await db.select().from(paymentEvents).where(eq(paymentEvents.orderId, order.id)).orderBy(paymentEvents.receivedAt)
  const refundLines = refundRows.length
    ? await db.select().from(refundItems).where(inArray(refundItems.refundId, refundRows.map(row => row.id)))
    : []
  // For the refund form: how many of each item could still go back on sale.
  const items = await db.select().from(orderItems).where(eq(orderItems.orderId, order.id))
  const returned = await returnedCounts(db, order.id)
  const view = await orderView(db, order)
  return {
    ...view,
    items: view.items.map((item) => {
      const row = items.find(candidate => candidate.id === item.id)!
      const restockable = restockableItem(row)
      return { ...item, restockable, returned: returned.get(item.id) ?? 0, restockLeft: restockable && !order.stockReleasedAt ? item.quantity - (returned.get(item.id) ?? 0) : 0 }
    }),
    paymentIntentId: order.paymentIntentId,
    paymentEvents: events.map(row => ({ type: row.type, outcome: row.outcome, receivedAt: row.receivedAt })),
    refunds: refundRows.map(row => ({ id: row.id, amountMinor: row.amountMinor, reason: row.reason, restock: row.restock, restockItems: refundLines.filter(line => line.refundId === row.id).map(line => ({ itemId: line.orderItemId, qty: line.quantity })), status: row.status, createdAt: row.createdAt })),
  }
})
