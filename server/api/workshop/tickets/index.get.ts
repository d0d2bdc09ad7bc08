import { and, asc, eq, gte, ilike, lt, lte, ne, or, sql } from 'drizzle-orm'
import { z } from 'zod'
import { blanks, orderItems, orders, recorders, tickets } from '../../../db/schema'

const querySchema = z.object({
  format: z.enum(tickets.format.enumValues, { error: 'format must be two_minute or four_minute' }).optional(),
  due: z.enum(['overdue', 'week', 'later'], { error: 'due must be overdue, week or later' }).optional(),
  q: z.string().trim().max(40, 'q is too long').optional(),
})

const dayOffset = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10)

/**
 * The board: every open ticket, and those done in the last 14 days, soonest due first. Filters:
 * format; due (overdue, within 7 days including overdue, or later); order number.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, querySchema)
  const today = dayOffset(0)
  const dueFilter = {
    overdue: lt(tickets.dueDate, today),
    week: lte(tickets.dueDate, dayOffset(7)),
    later: sql`${tickets.dueDate} > ${dayOffset(7)}`,
  }
  const db = await useDB()
  const rows = await db.select({
    id: tickets.id, stage: tickets.stage, format: tickets.format, dueDate: tickets.dueDate, wishes: tickets.wishes,
    unit: tickets.unit, quantity: orderItems.quantity, title: orderItems.title, kind: orderItems.kind,
    orderNumber: orders.number, orderStatus: orders.status, customer: sql<string>`${orders.shippingAddress}->>'name'`,
    blankCode: blanks.code, recorderName: recorders.name, cutAt: tickets.cutAt,
  }).from(tickets)
    .innerJoin(orders, eq(orders.id, tickets.orderId))
    .innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .leftJoin(blanks, eq(blanks.id, tickets.blankId))
    .leftJoin(recorders, eq(recorders.id, tickets.recorderId))
    .where(and(
      or(ne(tickets.stage, 'done'), gte(tickets.updatedAt, new Date(Date.now() - 14 * 86_400_000))),
      query.format ? eq(tickets.format, query.format) : undefined,
      query.due ? dueFilter[query.due] : undefined,
      query.q ? ilike(orders.number, `%${query.q.replace(/[%_\\]/g, ch => `\\${ch}`)}%`) : undefined,
    ))
    .orderBy(asc(tickets.dueDate), asc(tickets.id))
    .limit(500)
  return { today, tickets: rows.map(row => ({ ...row, overdue: row.dueDate !== null && row.dueDate < today && row.stage !== 'to_dispatch' && row.stage !== 'done' })) }
})
