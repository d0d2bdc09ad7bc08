import { createHmac, timingSafeEqual } from 'node:crypto'
import { and, eq, ne, sql } from 'drizzle-orm'
import { orderEvents, orderItems, orders, products, refundItems, refunds } from '../../db/schema'
import { addressOneLine } from '../../../shared/utils/addressPlace'
import type { Database, Transaction } from '../platform/db'

/** The order row (`OrderRow` of shared/types/rows.ts) under the name the shop's code has long used. */
export type Order = OrderRow
type OrderStatusValue = Order['status']
/** An order row this transaction holds locked: read `for update`, or just written by it. */
type LockedOrder = Pick<Order, 'id' | 'status'>

/** A guest's key to their order page, sent in their confirmation mail: an HMAC of the order number. */
export function orderAccessToken(orderNumber: string): string {
  const secret = String(useRuntimeConfig().session?.password ?? process.env.NUXT_SESSION_PASSWORD ?? '')
  if (secret.length < 32) throw new Error('NUXT_SESSION_PASSWORD must be at least 32 characters: it also signs guests\' order links')
  return createHmac('sha256', `order-link:${secret}`).update(orderNumber).digest('base64url').slice(0, 32)
}

export function orderAccessTokenValid(orderNumber: string, token: string): boolean {
  const expected = Buffer.from(orderAccessToken(orderNumber))
  const given = Buffer.from(token)
  return expected.length === given.length && timingSafeEqual(expected, given)
}

/**
 * A key to one made cylinder's test certificate, printed in the QR code on the packing slip. It opens that
 * certificate and nothing else: the slip may travel with a gift, and the order's own key would show what
 * was paid.
 */
export function certificateAccessToken(ticketId: number): string {
  const secret = String(useRuntimeConfig().session?.password ?? process.env.NUXT_SESSION_PASSWORD ?? '')
  if (secret.length < 32) throw new Error('NUXT_SESSION_PASSWORD must be at least 32 characters: it also signs certificate links')
  return createHmac('sha256', `certificate-link:${secret}`).update(String(ticketId)).digest('base64url').slice(0, 32)
}

export function certificateAccessTokenValid(ticketId: number, token: string): boolean {
  const expected = Buffer.from(certificateAccessToken(ticketId))
  const given = Buffer.from(token)
  return expected.length === given.length && timingSafeEqual(expected, given)
}

export function orderLink(orderNumber: string, signedIn: boolean): string {
  const site = String(useRuntimeConfig().siteUrl)
  return signedIn ? `${site}/account/orders/${orderNumber}` : `${site}/orders/${orderNumber}?t=${orderAccessToken(orderNumber)}`
}

/**
 * Moves an order from one of `from` to `to` with a conditional update, so a repeated or late event
 * finds nothing to do. Returns the updated order, or null when the order was not in a `from` state.
 * Given the order's id, it reads and locks the row first; given the row itself, the caller has already
 * read it `for update` (or written it) in this transaction, and it is not read again.
 */
export async function moveOrder(tx: Database | Transaction, order: number | LockedOrder, from: OrderStatusValue[], to: OrderStatusValue, extra: Partial<Order> = {}, note?: string, actorUserId?: number) {
  const [current] = typeof order === 'number'
    ? await tx.select({ id: orders.id, status: orders.status }).from(orders).where(eq(orders.id, order)).for('update')
    : [order]
  if (!current || !from.includes(current.status)) return null
  const orderId = current.id
  const [updated] = await tx.update(orders).set({ ...extra, status: to, updatedAt: new Date() })
    .where(and(eq(orders.id, orderId), eq(orders.status, current.status))).returning()
  if (!updated) return null
  await tx.insert(orderEvents).values({ orderId, fromStatus: current.status, toStatus: to, note, actorUserId })
  return updated
}

/** Gives the order's reserved stock back, once (guarded by `stock_released_at`). */
export async function returnStock(tx: Database | Transaction, orderId: number) {
  const [marked] = await tx.update(orders).set({ stockReleasedAt: new Date() })
    .where(and(eq(orders.id, orderId), sql`${orders.stockReleasedAt} is null`)).returning({ id: orders.id })
  if (!marked) return false
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, orderId))
  for (const item of items) {
    if (item.productId) await tx.update(products).set({ stock: sql`${products.stock} + ${item.quantity}` }).where(eq(products.id, item.productId))
  }
  // Blanks counted from the register: the order no longer promises its units, so count the pools again.
  await refreshBlankStock(tx)
  return true
}

/**
 * An unpaid order whose payment failed or expired (or that was given up): cancelled, and its stock is
 * for sale again. Its checkout key is let go, so the same browser may check out afresh.
 */
export async function releaseReservation(tx: Database | Transaction, order: number | LockedOrder, note: string, actorUserId?: number) {
  const cancelled = await moveOrder(tx, order, ['awaiting_payment'], 'cancelled', { checkoutKey: null }, note, actorUserId)
  if (cancelled) await returnStock(tx, cancelled.id)
  return cancelled
}

/**
 * Cancels an unpaid order on request (the workshop, or the customer giving up on the payment page).
 * The payment page is closed first, so nobody can pay for an order whose stock is already back on sale.
 * Safe to call twice at once and against the expiry event that closing the page sends: the move is
 * conditional and the stock goes back at most once (`returnStock`). Returns the order's state after.
 */
export async function cancelUnpaidOrder(order: Order, note: string, actorUserId?: number): Promise<{ number: string, status: OrderStatusValue }> {
  const db = await useDB()
  if (order.status === 'cancelled') return { number: order.number, status: order.status }
  if (order.status !== 'awaiting_payment') {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `Order ${order.number} is already ${order.status.replace(/_/g, ' ')}; it cannot be cancelled now.`, data: { status: order.status } })
  }
  if (order.checkoutSessionId) {
    const closed = await useStripe().checkout.sessions.expire(order.checkoutSessionId).then(() => true, () => false)
    if (!closed) {
      const session = await useStripe().checkout.sessions.retrieve(order.checkoutSessionId).catch(() => null)
      if (session?.status === 'complete') throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `Order ${order.number} has just been paid; it will show as paid in a moment.`, data: { status: 'paid' } })
      if (session?.status !== 'expired') throw createError({ statusCode: 502, statusMessage: 'Payment service error', message: 'The payment page could not be closed, so the order was not cancelled; try again in a minute.' })
    }
  }
  const cancelled = await db.transaction(tx => releaseReservation(tx, order.id, note, actorUserId))
  if (cancelled) return { number: cancelled.number, status: cancelled.status }
  // Closing the page sends its own expiry event, which may have cancelled the order first.
  const [now] = await db.select({ number: orders.number, status: orders.status }).from(orders).where(eq(orders.id, order.id))
  if (now?.status === 'cancelled') return now
  throw conflictError('The order changed meanwhile (perhaps it was just paid); reload it.', { status: now?.status })
}

/**
 * Puts the items a confirmed refund chose back on sale. Called once per refund: only from the
 * conditional move of the refund to `succeeded`, so repeated or late events add nothing.
 */
export async function restockRefund(tx: Database | Transaction, refundId: number) {
  const rows = await tx.select({ productId: orderItems.productId, quantity: refundItems.quantity })
    .from(refundItems).innerJoin(orderItems, eq(orderItems.id, refundItems.orderItemId))
    .where(eq(refundItems.refundId, refundId)).orderBy(orderItems.productId)
  for (const row of rows) {
    if (row.productId) await tx.update(products).set({ stock: sql`${products.stock} + ${row.quantity}` }).where(eq(products.id, row.productId))
  }
  await refreshBlankStock(tx)
  return rows.length
}

/** An item the maker may put back on sale: a stock item whose product still exists (not cut to order). */
export function restockableItem(item: OrderItemRow): boolean {
  return item.productId !== null && !item.madeToOrder && item.kind !== 'custom'
}

/** Per order item, how many are already back on sale or asked to go back by a refund not yet confirmed. */
export async function returnedCounts(db: Database | Transaction, orderId: number): Promise<Map<number, number>> {
  // A refund that failed puts nothing back, so its items may be chosen again.
  const rows = await db.select({ orderItemId: refundItems.orderItemId, quantity: sql<number>`sum(${refundItems.quantity})::int` })
    .from(refundItems).innerJoin(orderItems, eq(orderItems.id, refundItems.orderItemId)).innerJoin(refunds, eq(refunds.id, refundItems.refundId))
    .where(and(eq(orderItems.orderId, orderId), ne(refunds.status, 'failed'))).groupBy(refundItems.orderItemId)
  return new Map(rows.map(row => [row.orderItemId, Number(row.quantity)]))
}

class NotAllInStock extends Error {}

/**
 * Takes the stock of a cancelled order again (a payment that arrived after its hold ran out): all of
 * it or none, inside a savepoint, so a half-taken order leaves no stock missing.
 */
export async function reReserveStock(tx: Database | Transaction, orderId: number): Promise<boolean> {
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, orderId)).orderBy(orderItems.productId)
  try {
    await tx.transaction(async (savepoint) => {
      for (const item of items) {
        if (!item.productId) continue
        const [taken] = await savepoint.update(products).set({ stock: sql`${products.stock} - ${item.quantity}` })
          .where(and(eq(products.id, item.productId), sql`${products.stock} >= ${item.quantity}`)).returning({ id: products.id })
        if (!taken) throw new NotAllInStock()
      }
      await savepoint.update(orders).set({ stockReleasedAt: null }).where(eq(orders.id, orderId))
      await refreshBlankStock(savepoint)
    })
    return true
  }
  catch (error) {
    if (error instanceof NotAllInStock) return false
    throw error
  }
}

export async function orderWithItems(db: Database | Transaction, orderId: number) {
  const [order] = await db.select().from(orders).where(eq(orders.id, orderId))
  if (!order) return null
  const items = await db.select().from(orderItems).where(eq(orderItems.orderId, orderId))
  return { order, items }
}

/** The paid order's confirmation mail; given the row (as the payment that paid it wrote it), it is not read again. */
export async function queueOrderConfirmation(tx: Database | Transaction, paidOrder: number | Order) {
  const found = typeof paidOrder === 'number'
    ? await orderWithItems(tx, paidOrder)
    : { order: paidOrder, items: await tx.select().from(orderItems).where(eq(orderItems.orderId, paidOrder.id)) }
  if (!found) return
  const { order, items } = found
  const money = (minor: number) => formatMoney(minor, order.currency)
  const address = order.shippingAddress
  await queueMail(tx, {
    to: order.email,
    subject: `Order ${order.number} is paid — thank you`,
    dedupeKey: `order-paid:${order.number}`,
    content: {
      heading: `Thank you — order ${order.number} is paid`,
      paragraphs: [
        ...items.map(item => `${item.quantity} × ${item.title} — ${money(item.lineTotalMinor)}`),
        `Subtotal ${money(order.subtotalMinor)} · shipping ${money(order.shippingMinor)} · tax ${money(order.taxMinor)} · total ${money(order.totalMinor)}.`,
        `Shipping to: ${addressOneLine(address)}.`,
        items.some(item => item.madeToOrder)
          ? 'What happens next: cylinders made to order are cut on a tested blank; you can follow each step on your order page. Stock items are packed once everything is ready.'
          : 'What happens next: we pack your cylinders in padded tubes and tell you when the parcel leaves. In hot weather we may hold a parcel for a cooler day.',
      ],
      action: { label: 'Follow your order', url: orderLink(order.number, order.userId !== null) },
    },
  })
}

/**
 * Opens the hosted payment page for a freshly written order. The idempotency key makes a retried call
 * return the same session. If the payment service cannot be reached, the order is cancelled and its
 * stock given back at once, and the customer is told that nothing was charged. A replay for an order
 * another request is still opening passes `releaseOnFailure: false`: its failure must not cancel an
 * order whose page the first request may be opening successfully.
 */
export async function createCheckoutSession(order: Order, lines: { title: string, qty: number, unitPriceMinor: number }[], options: { releaseOnFailure?: boolean } = {}) {
  const site = String(useRuntimeConfig().siteUrl)
  const token = orderAccessToken(order.number)
  const stripe = useStripe()
  try {
    const extraLines = [
      ...(order.shippingMinor > 0 ? [{ title: 'Shipping', qty: 1, unitPriceMinor: order.shippingMinor }] : []),
      ...(order.taxMinor > 0 ? [{ title: 'Tax', qty: 1, unitPriceMinor: order.taxMinor }] : []),
    ]
    const session = await stripe.checkout.sessions.create({
      mode: 'payment',
      customer_email: order.email,
      client_reference_id: order.number,
      metadata: { order_number: order.number },
      payment_intent_data: { metadata: { order_number: order.number } },
      line_items: [...lines, ...extraLines].map(line => ({
        quantity: line.qty,
        price_data: { currency: order.currency.toLowerCase(), unit_amount: line.unitPriceMinor, product_data: { name: line.title } },
      })),
      expires_at: sessionExpiresAt(order),
      success_url: `${site}/checkout/done?order=${order.number}&t=${token}`,
      // The signed token lets the cart page give the order up on the customer's behalf (guests too).
      cancel_url: `${site}/cart?cancelled=${order.number}&t=${token}`,
    }, { idempotencyKey: `checkout-${order.number}` })
    const db = await useDB()
    await db.update(orders).set({ checkoutSessionId: session.id }).where(eq(orders.id, order.id))
    return session
  }
  catch (error) {
    if (options.releaseOnFailure === false) {
      console.error('[checkout] session replay failed:', error instanceof Error ? error.message : error)
      throw createError({ statusCode: 409, statusMessage: 'Checkout in progress', message: 'This checkout is still being prepared; wait a moment and press the button again.' })
    }
    const db = await useDB()
    await db.transaction(tx => releaseReservation(tx, order.id, 'The payment service could not be reached.'))
    console.error('[checkout] session creation failed:', error instanceof Error ? error.message : error)
    throw createError({ statusCode: 502, statusMessage: 'Payment service unavailable', message: 'The payment service could not be reached. Nothing was charged; please try again in a minute.' })
  }
}

/** What a customer (or the maker) sees of one order: no payment-service ids. */
export async function orderView(db: Database | Transaction, order: Order) {
  const items = await db.select().from(orderItems).where(eq(orderItems.orderId, order.id))
  const packedBlanks = await orderBlankCodes(db, order.id)
  const timeline = await db.select({ at: orderEvents.at, from: orderEvents.fromStatus, to: orderEvents.toStatus, note: orderEvents.note })
    .from(orderEvents).where(eq(orderEvents.orderId, order.id)).orderBy(orderEvents.at, orderEvents.id)
  return {
    number: order.number,
    status: order.status,
    email: order.email,
    shippingAddress: order.shippingAddress,
    zone: order.zone,
    currency: order.currency,
    subtotalMinor: order.subtotalMinor,
    shippingMinor: order.shippingMinor,
    taxMinor: order.taxMinor,
    totalMinor: order.totalMinor,
    refundedMinor: order.refundedMinor,
    createdAt: order.createdAt,
    paidAt: order.paidAt,
    reservationExpiresAt: order.reservationExpiresAt,
    // blankCodes: the register blanks packed for a blank item, one per unit (empty until it is packed).
    items: items.map(item => ({ id: item.id, title: item.title, kind: item.kind, format: item.format, quantity: item.quantity, unitPriceMinor: item.unitPriceMinor, lineTotalMinor: item.lineTotalMinor, madeToOrder: item.madeToOrder, blankCodes: packedBlanks.get(item.id) ?? [] })),
    timeline,
    // Personal messages with their proofs (empty for an order of cylinders only).
    messages: await orderMessages(db, order),
    // Dispatch: the shipment, breakage claims, and whether the customer may report one or say it arrived.
    ...(await orderDispatchView(db, order)),
  }
}
