import { and, asc, count, eq, gte, ilike, lt, lte, ne, or, sql } from 'drizzle-orm'
import { z } from 'zod'
import { blanks, customMessages, orderItems, orders, recorders, ticketEvents, tickets } from '../../db/schema'
import type { Database } from '../platform/db'

/** The most tickets one page of the board holds; the answer says how many there are in all. */
const TICKET_BOARD_PAGE_MAX = 500

const stageFilters = [...ticketStages, 'recut'] as const

/** The board's filters and page, from the address. */
export const ticketBoardQuerySchema = z.object({
  format: z.enum(tickets.format.enumValues, { error: 'format must be two_minute or four_minute' }).optional(),
  due: z.enum(['overdue', 'week', 'later'], { error: 'due must be overdue, week or later' }).optional(),
  stage: z.enum(stageFilters, { error: `stage must be one of ${stageFilters.join(', ')}` }).optional(),
  q: z.string().trim().max(40, 'q is too long').optional(),
  page: numberInputField('page', { integer: true, min: 1, max: 10_000 }).default(1),
  pageSize: numberInputField('pageSize', { integer: true, min: 1, max: TICKET_BOARD_PAGE_MAX }).default(200),
})

const dayOffset = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10)

// A recut is logged as a move back to blank_assigned from a stage after the cut (ticketMoveRules);
// counting those events marks the tickets being made again, however many times. (The stage names are
// the table's own constants, written into the SQL as enum literals.)
const recutFromStages = [...new Set(ticketMoveRules.filter(rule => rule.recut).map(rule => rule.from))]
const recutEvent = sql`${ticketEvents.ticketId} = ${tickets.id} and ${ticketEvents.toStage} = 'blank_assigned' and ${ticketEvents.fromStage} in (${sql.raw(recutFromStages.map(stage => `'${stage}'`).join(', '))})`
const recutCount = sql<number>`(select count(*)::int from ${ticketEvents} where ${recutEvent})`
const lastRecutNote = sql<string | null>`(select ${ticketEvents.note} from ${ticketEvents} where ${recutEvent} order by ${ticketEvents.at} desc, ${ticketEvents.id} desc limit 1)`

/**
 * The board: every open ticket, and those done in the last 14 days, soonest due first, a page at a
 * time (`total` says how many match, so nothing is cut off silently). Filters: format; due (overdue,
 * within 7 days including overdue, or later); stage (or `recut`: tickets sent back to be cut again);
 * order number. Each ticket says how often it has been recut and why, last.
 */
export async function ticketBoard(db: Database, query: z.output<typeof ticketBoardQuerySchema>) {
  const today = dayOffset(0)
  const dueFilter = {
    overdue: lt(tickets.dueDate, today),
    week: lte(tickets.dueDate, dayOffset(7)),
    later: sql`${tickets.dueDate} > ${dayOffset(7)}`,
  }
  const where = and(
    or(ne(tickets.stage, 'done'), gte(tickets.updatedAt, new Date(Date.now() - 14 * 86_400_000))),
    query.format ? eq(tickets.format, query.format) : undefined,
    query.due ? dueFilter[query.due] : undefined,
    query.stage === 'recut' ? sql`${recutCount} > 0` : query.stage ? eq(tickets.stage, query.stage) : undefined,
    query.q ? ilike(orders.number, containsPattern(query.q)) : undefined,
  )
  const rows = await db.select({
    id: tickets.id, stage: tickets.stage, format: tickets.format, dueDate: tickets.dueDate, wishes: tickets.wishes,
    unit: tickets.unit, quantity: orderItems.quantity, title: orderItems.title, kind: orderItems.kind,
    orderNumber: orders.number, orderStatus: orders.status, customer: sql<string>`${orders.shippingAddress}->>'name'`,
    blankCode: blanks.code, recorderName: recorders.name, cutAt: tickets.cutAt,
    recuts: recutCount, lastRecutNote,
    message: { wishedDate: customMessages.wishedDate, quote: customMessages.quote, voice: customMessages.voice },
  }).from(tickets)
    .innerJoin(orders, eq(orders.id, tickets.orderId))
    .innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .leftJoin(blanks, eq(blanks.id, tickets.blankId))
    .leftJoin(recorders, eq(recorders.id, tickets.recorderId))
    .leftJoin(customMessages, eq(customMessages.orderItemId, tickets.orderItemId))
    .where(where)
    .orderBy(asc(tickets.dueDate), asc(tickets.id))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize)
  const [total] = await db.select({ n: count() }).from(tickets).innerJoin(orders, eq(orders.id, tickets.orderId)).where(where)
  return {
    today,
    total: total?.n ?? 0,
    page: query.page,
    pageSize: query.pageSize,
    tickets: rows.map(row => ({
      ...row,
      // A personal message: its wished-for date and how its script fits (null for other tickets).
      message: messageSummaryForTicket(row.message?.wishedDate ? row.message as { wishedDate: string, quote: Record<string, unknown>, voice: string } : null),
      recuts: Number(row.recuts),
      // The log keeps "Recut: <reason>"; the board shows the reason.
      lastRecutNote: row.lastRecutNote?.replace(/^Recut:\s*/, '') ?? null,
      overdue: row.dueDate !== null && row.dueDate < today && row.stage !== 'to_dispatch' && row.stage !== 'done',
    })),
  }
}
