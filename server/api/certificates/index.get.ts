import { and, asc, eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { orderItems, orders, tickets } from '../../db/schema'

const querySchema = z.object({
  order: z.string({ error: 'order is required' }).trim().toUpperCase().min(1, 'order is required').max(40, 'order is too long'),
  t: z.string().max(100).optional(),
})

/** The certificates issued so far for one order's cylinders (for the order page), with the same access as the order. */
export default defineEventHandler(async (event) => {
  const query = queryWith(event, querySchema)
  const user = await currentUser(event)
  const db = await useDB()
  const [order] = await db.select({ id: orders.id, number: orders.number, userId: orders.userId }).from(orders).where(eq(orders.number, query.order))
  if (!order || !mayReadOrderCertificates(user, order, query.t)) throw notFoundError('No such order.')
  const rows = await db.select({ ticketId: tickets.id, orderItemId: tickets.orderItemId, unit: tickets.unit, title: orderItems.title, cutAt: tickets.cutAt })
    .from(tickets).innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .where(and(eq(tickets.orderId, order.id), inArray(tickets.stage, certifiedTicketStages)))
    .orderBy(asc(tickets.orderItemId), asc(tickets.unit))
  return { certificates: rows.filter(row => row.cutAt !== null) }
})
