import { eq, sum } from 'drizzle-orm'
import Stripe from 'stripe'
import { z } from 'zod'
import { orders, refunds } from '../../../../db/schema'

const paramsSchema = z.object({ number: z.string().trim().min(1).max(40) })
const bodySchema = z.object({
  amountMinor: z.number({ error: 'amountMinor must be a number of cents' }).int('amountMinor must be whole cents').positive('amountMinor must be more than 0').optional(),
  reason: z.string({ error: 'reason is required' }).trim().min(3, 'reason: say why, in a few words').max(500, 'reason is too long'),
  restock: z.boolean({ error: 'restock must be true or false' }).default(false),
})

const refundable = new Set(['paid', 'in_production', 'proof_pending', 'ready_to_pack', 'packed', 'shipped', 'delivered'])

export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const input = await readBodyWith(event, bodySchema)
  const db = await useDB()
  const refund = await db.transaction(async (tx) => {
    const [order] = await tx.select().from(orders).where(eq(orders.number, number)).for('update')
    if (!order) throw createError({ statusCode: 404, statusMessage: 'Not found', message: 'No such order.' })
    if (!refundable.has(order.status) || !order.paymentIntentId) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `An order that is ${order.status} cannot be refunded.` })
    // Refunds asked for but not yet confirmed count too, so two clicks cannot refund twice.
    const [asked] = await tx.select({ total: sum(refunds.amountMinor) }).from(refunds).where(eq(refunds.orderId, order.id))
    const remaining = order.totalMinor - Math.max(Number(asked?.total ?? 0), order.refundedMinor)
    const amountMinor = input.amountMinor ?? remaining
    if (amountMinor <= 0 || amountMinor > remaining) throw fieldError('amountMinor', `at most ${formatMoney(Math.max(0, remaining), order.currency)} is left to refund`)
    const [row] = await tx.insert(refunds).values({ orderId: order.id, amountMinor, reason: input.reason, restock: input.restock, createdBy: maker.id }).returning()
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
  setResponseStatus(event, 202)
  return { refundId: refund.row.id, amountMinor: refund.row.amountMinor, status: 'requested' }
})
