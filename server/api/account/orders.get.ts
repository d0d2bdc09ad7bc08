import { desc, eq, inArray } from 'drizzle-orm'
import { orderItems, orders } from '../../db/schema'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event)
  const db = await useDB()
  const rows = await db.select().from(orders).where(eq(orders.userId, user.id)).orderBy(desc(orders.createdAt)).limit(200)
  const items = rows.length ? await db.select().from(orderItems).where(inArray(orderItems.orderId, rows.map(order => order.id))) : []
  return rows.map(order => ({
    number: order.number,
    status: order.status,
    createdAt: order.createdAt,
    currency: order.currency,
    totalMinor: order.totalMinor,
    refundedMinor: order.refundedMinor,
    items: items.filter(item => item.orderId === order.id).map(item => `${item.quantity} × ${item.title}`),
  }))
})
