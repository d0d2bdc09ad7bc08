import { and, asc, count, eq, gte, inArray, lte, ne, or, sql } from 'drizzle-orm'
import { orderItems, orders, tickets } from '../../db/schema'

const waitingStates = ['paid', 'in_production', 'proof_pending', 'ready_to_pack', 'packed'] as const
/** Below this many blanks ready to assign, a format is shown as running low. */
const lowBlankCount = 3

const isoDay = (date: Date) => date.toISOString().slice(0, 10)

/**
 * The maker's overview. Due this week = open tickets not yet at dispatch whose due date is within
 * 7 days (overdue included). Blanks ready = blanks a ticket could take now. Yield per batch = blanks
 * with a passing surface test ÷ blanks tested. Revenue this month (UTC) = totals of orders paid this
 * month, less what has been refunded of them.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const db = await useDB()
  const now = new Date()
  const today = isoDay(now)
  const monthStart = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), 1))
  const recentDone = new Date(now.getTime() - 30 * 86_400_000)

  const dueThisWeek = await db.select({ id: tickets.id, stage: tickets.stage, dueDate: tickets.dueDate, format: tickets.format, title: orderItems.title, orderNumber: orders.number })
    .from(tickets).innerJoin(orders, eq(orders.id, tickets.orderId)).innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .where(and(inArray(tickets.stage, ['queued', 'blank_assigned', 'cut', 'proof_sent', 'approved']), lte(tickets.dueDate, isoDay(new Date(now.getTime() + 7 * 86_400_000)))))
    .orderBy(asc(tickets.dueDate), asc(tickets.id)).limit(25)
  const perStage = await db.select({ stage: tickets.stage, n: count() }).from(tickets)
    .where(or(ne(tickets.stage, 'done'), gte(tickets.updatedAt, recentDone))).groupBy(tickets.stage)
  const waiting = await db.select({ status: orders.status, n: count() }).from(orders).where(inArray(orders.status, [...waitingStates])).groupBy(orders.status)
  const blanksReady = await Promise.all(cylinderFormats.map(async (format) => {
    const ready = (await eligibleBlanks(db, format, { limit: 10_000 })).length
    return { format, ready, low: ready < lowBlankCount }
  }))
  // The register's own rule (server/utils/workshop/blankBatches.ts), so the two pages agree.
  const batches = await listWaxBatchesWithYield(db)
  const revenue = await db.select({
    currency: orders.currency,
    orders: count(),
    paidMinor: sql<number>`coalesce(sum(${orders.totalMinor}), 0)::int`,
    refundedMinor: sql<number>`coalesce(sum(${orders.refundedMinor}), 0)::int`,
  }).from(orders).where(gte(orders.paidAt, monthStart)).groupBy(orders.currency)

  return {
    today,
    dueThisWeek: dueThisWeek.map(row => ({ ...row, overdue: row.dueDate !== null && row.dueDate < today })),
    ticketsPerStage: ticketStages.map(stage => ({ stage, count: perStage.find(row => row.stage === stage)?.n ?? 0 })),
    ordersWaiting: waitingStates.map(status => ({ status, count: waiting.find(row => row.status === status)?.n ?? 0 })),
    blanksReady,
    lowBlankCount,
    recorders: (await rankRecorders(db)).slice(0, 5),
    recorderRule: recorderRankingRule,
    yieldPerBatch: batches.reverse().map(batch => ({ code: batch.code, pourDate: batch.pourDate, tested: batch.tested, passed: batch.passed, yield: batch.yield })),
    revenue: {
      monthStart,
      byCurrency: revenue.map(row => ({ ...row, netMinor: row.paidMinor - row.refundedMinor })),
    },
  }
})
