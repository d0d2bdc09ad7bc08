import type Stripe from 'stripe'
import { and, eq, isNull, or, sql } from 'drizzle-orm'
import { orderEvents, orders, refunds } from '../../db/schema'
import type { Transaction } from '../platform/db'

interface Handled {
  outcome: string
  orderId?: number
  // Set when the event does not belong to the order it names (or names none): nothing was changed.
  ignored?: string
  // Calls to the payment service happen after the transaction commits.
  followUp?: () => Promise<unknown>
}

/**
 * The order an event names, read once and locked for the rest of the event's transaction: what the event
 * does is decided on this row and the row is passed along (moves, mails, tickets), never read again.
 */
async function findOrder(tx: Transaction, by: { number?: string | null, paymentIntent?: string | null }) {
  // Metadata is whatever the sender wrote: only a string can name an order.
  if (typeof by.number === 'string' && by.number) {
    const [order] = await tx.select().from(orders).where(eq(orders.number, by.number)).for('update')
    if (order) return order
  }
  if (typeof by.paymentIntent === 'string' && by.paymentIntent) {
    const [order] = await tx.select().from(orders).where(eq(orders.paymentIntentId, by.paymentIntent)).for('update')
    if (order) return order
  }
  return null
}

const intentId = (value: string | { id: string } | null | undefined) => (typeof value === 'string' ? value : value?.id ?? null)

const ignore = (reason: string, orderId?: number): Handled => ({ outcome: `ignored: ${reason}`, ignored: reason, orderId })
const NO_ORDER = 'names no order of this shop'
// What a sender wrote, as it goes into a log line or an outcome: quoted and cut short.
const shown = (value: unknown) => JSON.stringify(String(value).slice(0, 80))

const sameCurrency = (given: string | null | undefined, order: OrderRow) => (given ?? '').toLowerCase() === order.currency.toLowerCase()

/**
 * Why a checkout session is not the payment page this order was opened with, or null when it is. An
 * event's metadata only names an order, and anyone able to sign an event (or another integration on the
 * same account) can name any; the session id stored when the page was opened, and the total and
 * currency asked for, say whether this payment is really that order's.
 */
function sessionMismatch(session: { id: string, amount_total: number | null, currency: string | null }, order: OrderRow): string | null {
  if (!order.checkoutSessionId || session.id !== order.checkoutSessionId) return `session ${shown(session.id)} is not the payment page of order ${order.number}`
  if (session.amount_total !== order.totalMinor) return `amount ${shown(session.amount_total)} is not the total ${order.totalMinor} of order ${order.number}`
  if (!sameCurrency(session.currency, order)) return `currency ${shown(session.currency)} is not the currency ${order.currency} of order ${order.number}`
  return null
}

/**
 * Why a charge or refund does not belong to this order, or null when it does: it must be of the payment
 * the order was paid with (stored when its session was settled), so an order not yet paid has none.
 */
function paymentMismatch(paymentIntent: string | null, currency: string | null | undefined, order: OrderRow): string | null {
  if (!order.paymentIntentId || paymentIntent !== order.paymentIntentId) return `payment ${shown(paymentIntent)} is not the payment of order ${order.number}`
  if (!sameCurrency(currency, order)) return `currency ${shown(currency)} is not the currency ${order.currency} of order ${order.number}`
  return null
}

/**
 * Why a failed payment is not one for this order's payment page, or null. Before an order is paid the
 * shop knows no payment id of its own, so the payment service is asked which payment the order's
 * session is using (cheap checks first, so a forged event rarely costs a call).
 */
async function failedPaymentMismatch(intent: Stripe.PaymentIntent, order: OrderRow): Promise<string | null> {
  if (intent.amount !== order.totalMinor) return `amount ${shown(intent.amount)} is not the total ${order.totalMinor} of order ${order.number}`
  if (!sameCurrency(intent.currency, order)) return `currency ${shown(intent.currency)} is not the currency ${order.currency} of order ${order.number}`
  if (!order.checkoutSessionId) return `order ${order.number} has no payment page`
  const session = await useStripe().checkout.sessions.retrieve(order.checkoutSessionId)
  if (intentId(session.payment_intent) !== intent.id) return `payment ${shown(intent.id)} is not the payment of order ${order.number}'s page`
  return null
}

/**
 * A checkout session the payment service reports complete and paid: the order becomes paid (once),
 * its confirmation is queued and its production tickets made. Used by the webhook and by the sweep.
 */
export async function settlePaidSession(tx: Transaction, session: Stripe.Checkout.Session): Promise<Handled> {
  const order = await findOrder(tx, { number: session.metadata?.order_number ?? session.client_reference_id })
  if (!order) return ignore(NO_ORDER)
  const mismatch = sessionMismatch(session, order)
  if (mismatch) return ignore(mismatch, order.id)
  const paymentIntent = intentId(session.payment_intent)
  const paid = await moveOrder(tx, order, ['awaiting_payment'], 'paid', { paidAt: new Date(), paymentIntentId: paymentIntent })
  if (paid) {
    await queueOrderConfirmation(tx, paid)
    await createTicketsForOrder(tx, paid)
    await queueMakerPaidOrderMail(tx, paid.id)
    return { outcome: 'paid', orderId: order.id }
  }
  if (order.status !== 'cancelled' || order.paidAt !== null) return { outcome: `ignored: order is ${order.status}`, orderId: order.id }
  // The money came after the hold ran out: take the stock again if all of it is still there, else refund.
  if (await reReserveStock(tx, order.id)) {
    const paidLate = await moveOrder(tx, order, ['cancelled'], 'paid', { paidAt: new Date(), paymentIntentId: paymentIntent }, 'Payment arrived after the hold ran out; the stock was still there.')
    if (paidLate) {
      await queueOrderConfirmation(tx, paidLate)
      await createTicketsForOrder(tx, paidLate)
      await queueMakerPaidOrderMail(tx, paidLate.id)
    }
    return { outcome: 'paid late', orderId: order.id }
  }
  await tx.update(orders).set({ paymentIntentId: paymentIntent, paidAt: new Date() }).where(eq(orders.id, order.id))
  // The refund is written down first, so the maker sees it pending even if the call below fails.
  const [refund] = await tx.insert(refunds).values({ orderId: order.id, amountMinor: order.totalMinor, reason: 'sold out before your payment arrived' }).returning()
  await tx.insert(orderEvents).values({ orderId: order.id, fromStatus: order.status, toStatus: order.status, note: 'Paid after the stock was sold: refunding in full.' })
  return {
    outcome: 'paid after sell-out: refunding',
    orderId: order.id,
    followUp: async () => {
      const made = await useStripe().refunds.create({ payment_intent: paymentIntent!, reason: 'requested_by_customer', metadata: { order_number: order.number, refund_id: String(refund!.id) } }, { idempotencyKey: `refund-${refund!.id}` })
      const db = await useDB()
      await db.update(refunds).set({ providerRefundId: made.id }).where(eq(refunds.id, refund!.id))
    },
  }
}

export async function handlePaymentEvent(tx: Transaction, paymentEvent: Stripe.Event): Promise<Handled> {
  switch (paymentEvent.type) {
    case 'checkout.session.completed': {
      const session = paymentEvent.data.object
      if (session.payment_status !== 'paid') return { outcome: 'not paid yet' }
      // A re-cut of a personal message paid for on its own page (server/utils/custom/proofs.ts).
      if (session.metadata?.purpose === 'paid_recut') return await settlePaidRecut(tx, session)
      return await settlePaidSession(tx, session)
    }
    case 'checkout.session.expired': {
      const session = paymentEvent.data.object
      const order = await findOrder(tx, { number: session.metadata?.order_number ?? session.client_reference_id })
      if (!order) return ignore(NO_ORDER)
      const mismatch = sessionMismatch(session, order)
      if (mismatch) return ignore(mismatch, order.id)
      const released = await releaseReservation(tx, order, 'The payment page expired unpaid.')
      // Released here or already by the customer leaving the page: a declined card is told now, once.
      await queueDeclinedPaymentMail(tx, order.id)
      // Nothing left to release when the customer gave up, the hold ran out first, or it was paid: say so.
      return { outcome: released ? 'released' : `nothing to release: order already ${order.status.replace(/_/g, ' ')}`, orderId: order.id }
    }
    case 'payment_intent.payment_failed': {
      // A declined card may be tried again on the same payment page, so the hold stays until the
      // page expires (checkout.session.expired releases it). The customer is told only then, and only
      // if the order is still unpaid: a decline put right with another try sends no mail.
      const intent = paymentEvent.data.object
      const order = await findOrder(tx, { number: intent.metadata?.order_number })
      if (!order) return ignore(NO_ORDER)
      if (order.status !== 'awaiting_payment') return { outcome: `ignored: order is ${order.status}`, orderId: order.id }
      const mismatch = await failedPaymentMismatch(intent, order)
      if (mismatch) return ignore(mismatch, order.id)
      await tx.insert(orderEvents).values({ orderId: order.id, fromStatus: order.status, toStatus: order.status, note: `Card declined: ${intent.last_payment_error?.message ?? 'no reason given'}` })
      return { outcome: 'declined; hold kept and the customer told if the page closes unpaid', orderId: order.id }
    }
    case 'charge.refunded': {
      const charge = paymentEvent.data.object
      const order = await findOrder(tx, { number: charge.metadata?.order_number, paymentIntent: intentId(charge.payment_intent) })
      if (!order) return ignore(NO_ORDER)
      const mismatch = paymentMismatch(intentId(charge.payment_intent), charge.currency, order)
        ?? (charge.amount === order.totalMinor ? null : `charge amount ${shown(charge.amount)} is not the total ${order.totalMinor} of order ${order.number}`)
      if (mismatch) return ignore(mismatch, order.id)
      // Newer API versions leave the refund list out of the charge: ask for it.
      const listed = charge.refunds?.data ?? (await useStripe().refunds.list({ payment_intent: order.paymentIntentId!, limit: 100 })).data
      return { outcome: await applyRefunds(tx, order, charge.amount_refunded, listed), orderId: order.id }
    }
    case 'charge.refund.updated': {
      // A refund that changed after it was made: above all one that failed (the money is back on the
      // charge). Settled like the refunds listed on a charge; the refunded total is not touched here.
      const refund = paymentEvent.data.object
      const order = await findOrder(tx, { number: refund.metadata?.order_number, paymentIntent: intentId(refund.payment_intent) })
      if (!order) return ignore(NO_ORDER)
      const mismatch = paymentMismatch(intentId(refund.payment_intent), refund.currency, order)
      if (mismatch) return ignore(mismatch, order.id)
      const outcome = await applyRefunds(tx, order, 0, [refund])
      if (refund.status === 'failed' || refund.status === 'canceled') {
        // The charge now says how much really went back: the one place the refunded total may go down.
        const chargeId = typeof refund.charge === 'string' ? refund.charge : refund.charge?.id
        const charge = chargeId ? await useStripe().charges.retrieve(chargeId) : null
        // Only this order's own charge may set what it has had back.
        if (charge && intentId(charge.payment_intent) === order.paymentIntentId) {
          await tx.update(orders).set({ refundedMinor: sql`least(${orders.totalMinor}, ${charge.amount_refunded})`, updatedAt: new Date() }).where(eq(orders.id, order.id))
        }
        return { outcome: `refund ${refund.status}`, orderId: order.id }
      }
      return { outcome, orderId: order.id }
    }
    default:
      return { outcome: 'ignored type' }
  }
}

async function applyRefunds(tx: Transaction, order: OrderRow, amountRefunded: number, providerRefunds: Stripe.Refund[]) {
  for (const providerRefund of providerRefunds) {
    // Only a refund of this order's payment settles one of the refunds the shop asked for, and only the
    // one it was made for: same amount, and not already tied to another refund of the payment service.
    if (intentId(providerRefund.payment_intent) !== order.paymentIntentId) continue
    const localId = Number(providerRefund.metadata?.refund_id)
    const match = and(
      Number.isInteger(localId) && localId > 0 ? eq(refunds.id, localId) : eq(refunds.providerRefundId, providerRefund.id),
      eq(refunds.amountMinor, providerRefund.amount),
      or(isNull(refunds.providerRefundId), eq(refunds.providerRefundId, providerRefund.id)),
    )
    if (providerRefund.status === 'failed' || providerRefund.status === 'canceled') {
      // Not paid back after all: the refund no longer counts against what is left to refund or
      // restock. One the shop had already counted as paid back is left for the maker to look at.
      await tx.update(refunds).set({ status: 'failed', providerRefundId: providerRefund.id })
        .where(and(match, eq(refunds.orderId, order.id), sql`${refunds.status} not in ('succeeded', 'failed')`))
      continue
    }
    if (providerRefund.status !== 'succeeded') continue
    const [settled] = await tx.update(refunds).set({ status: 'succeeded', providerRefundId: providerRefund.id })
      .where(and(match, eq(refunds.orderId, order.id), sql`${refunds.status} <> 'succeeded'`)).returning()
    // The items this refund chose go back on sale here, once: only the event that moved the refund to
    // `succeeded` gets a row back, so a repeated or late event restocks nothing.
    if (settled?.restock) await restockRefund(tx, settled.id)
    if (settled) {
      await queueMail(tx, {
        to: order.email,
        subject: `Refund for order ${order.number}`,
        dedupeKey: `refund:${settled.id}`,
        content: {
          heading: 'Your refund is on its way',
          paragraphs: [
            `We have refunded ${formatMoney(settled.amountMinor, order.currency)} of order ${order.number} to the card you paid with. Reason: ${settled.reason}.`,
            'Banks usually show a refund within 5–10 working days.',
          ],
          action: { label: 'See your order', url: orderLink(order.number, order.userId !== null) },
        },
      })
    }
  }
  // Never lowered by an older event arriving late; never above the total.
  const [updated] = await tx.update(orders)
    .set({ refundedMinor: sql`least(${orders.totalMinor}, greatest(${orders.refundedMinor}, ${amountRefunded}))`, updatedAt: new Date() })
    .where(eq(orders.id, order.id)).returning({ refundedMinor: orders.refundedMinor, totalMinor: orders.totalMinor })
  if (updated && updated.refundedMinor >= updated.totalMinor) {
    await moveOrder(tx, order, ['paid', 'in_production', 'proof_pending', 'ready_to_pack', 'packed', 'shipped', 'delivered', 'cancelled'], 'refunded', {}, 'Refunded in full.')
    await closeTicketsOfRefundedOrder(tx, order.id)
    return 'refunded in full'
  }
  return 'refunded in part'
}
