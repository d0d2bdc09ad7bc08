import { and, eq, ne, sum } from 'drizzle-orm'
import Stripe from 'stripe'
import { z } from 'zod'
import { orderItems, orders, refundItems, refunds } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

/** What the maker asks for on an order's refund form. */
export const refundRequestSchema = z.object({
  amountMinor: z.number({ error: 'amountMinor must be a number of cents' }).int('amountMinor must be whole cents').positive('amountMinor must be more than 0').optional(),
  reason: z.string({ error: 'reason is required' }).trim().min(3, 'reason: say why, in a few words').max(500, 'reason is too long'),
  // Which items go back on sale once the refund is confirmed, and how many of each. `true` means every
  // stock item not yet returned; `false` (the default) none.
  restock: z.union([
    z.boolean(),
    z.array(z.object({
      itemId: z.number({ error: 'itemId must be the id of an item of this order' }).int('itemId must be a whole number').positive('itemId must be the id of an item of this order'),
      qty: z.number({ error: 'qty must be a number' }).int('qty must be a whole number').positive('qty must be at least 1').max(1000, 'qty is too large'),
    }), { error: 'restock must be a list of { itemId, qty }, or true or false' }).max(30, 'restock: at most 30 items'),
  ], { error: 'restock must be a list of { itemId, qty }, or true or false' }).default(false),
})
export type RefundRequest = z.output<typeof refundRequestSchema>

/**
 * Checks what the maker wants back on sale against the order: items of this order only, stock items only
 * (a cylinder cut to order is not stock), and no more of each than was ordered minus what earlier refunds
 * already returned or asked to return. Runs with the order locked, so two refunds cannot both return the
 * last one.
 */
async function chooseRestock(tx: Transaction, order: OrderRow, wanted: boolean | { itemId: number, qty: number }[]) {
  if (wanted === false) return []
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, order.id)).orderBy(orderItems.id)
  const returned = await returnedCounts(tx, order.id)
  // An order whose whole stock already went back (an older all-at-once restock) has nothing left to return.
  const left = (item: typeof items[number]) => (order.stockReleasedAt ? 0 : item.quantity - (returned.get(item.id) ?? 0))
  if (wanted === true) return items.filter(item => restockableItem(item) && left(item) > 0).map(item => ({ itemId: item.id, qty: left(item) }))
  const seen = new Set<number>()
  return wanted.map((line, index) => {
    const item = items.find(candidate => candidate.id === line.itemId)
    if (!item) throw fieldError(`restock.${index}.itemId`, `order ${order.number} has no item ${line.itemId}`)
    if (seen.has(item.id)) throw fieldError(`restock.${index}.itemId`, `"${item.title}" is listed twice; give its count once`)
    seen.add(item.id)
    if (!restockableItem(item)) throw fieldError(`restock.${index}.itemId`, `"${item.title}" is made to order, not stock, so it cannot go back on sale`)
    if (line.qty > left(item)) throw fieldError(`restock.${index}.qty`, `at most ${left(item)} of "${item.title}" can go back on sale (${item.quantity} ordered, ${item.quantity - left(item)} already returned)`)
    return line
  })
}

const refundable = new Set(['paid', 'in_production', 'proof_pending', 'ready_to_pack', 'packed', 'shipped', 'delivered'])

/**
 * A refund the maker asks for: checked against what is left to refund and what can go back on sale,
 * written as requested with the order locked (two clicks cannot refund twice), then sent to the payment
 * service. Its event settles it later; stock goes back only then.
 */
export async function requestRefund(db: Database, number: string, input: RefundRequest, makerId: number) {
  const refund = await db.transaction(async (tx) => {
    const [order] = await tx.select().from(orders).where(eq(orders.number, number)).for('update')
    if (!order) throw notFoundError('No such order.')
    if (!refundable.has(order.status) || !order.paymentIntentId) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `An order that is ${order.status} cannot be refunded.` })
    // Refunds asked for but not yet confirmed count too, so two clicks cannot refund twice.
    const [asked] = await tx.select({ total: sum(refunds.amountMinor) }).from(refunds).where(and(eq(refunds.orderId, order.id), ne(refunds.status, 'failed')))
    const remaining = order.totalMinor - Math.max(Number(asked?.total ?? 0), order.refundedMinor)
    const amountMinor = input.amountMinor ?? remaining
    if (amountMinor <= 0 || amountMinor > remaining) throw fieldError('amountMinor', `at most ${formatMoney(Math.max(0, remaining), order.currency)} is left to refund`)
    const restock = await chooseRestock(tx, order, input.restock)
    const [row] = await tx.insert(refunds).values({ orderId: order.id, amountMinor, reason: input.reason, restock: restock.length > 0, createdBy: makerId }).returning()
    if (restock.length) await tx.insert(refundItems).values(restock.map(line => ({ refundId: row!.id, orderItemId: line.itemId, quantity: line.qty })))
    return { row: row!, order }
  })
  try {
    const providerRefund = await useStripe().refunds.create({
      payment_intent: refund.order.paymentIntentId!,
      amount: refund.row.amountMinor,
      reason: 'requested_by_customer',
      metadata: { order_number: refund.order.number, refund_id: String(refund.row.id) },
    }, { idempotencyKey: `refund-${refund.row.id}` })
    await db.update(refunds).set({ providerRefundId: providerRefund.id }).where(eq(refunds.id, refund.row.id))
  }
  catch (error) {
    // Only a refusal means no refund was made; after a timeout it may have been, so the row stays
    // (still counted against what is left) until the payment service's event settles it.
    if (error instanceof Stripe.errors.StripeInvalidRequestError || error instanceof Stripe.errors.StripeCardError) {
      await db.delete(refunds).where(eq(refunds.id, refund.row.id))
      throw createError({ statusCode: 502, statusMessage: 'Payment service error', message: `The refund was refused: ${error.message}.` })
    }
    throw createError({ statusCode: 502, statusMessage: 'Payment service error', message: 'The payment service did not answer. The refund may still go through: it is listed as requested; check again in a few minutes before trying again.' })
  }
  return { refundId: refund.row.id, amountMinor: refund.row.amountMinor, status: 'requested' as const }
}
