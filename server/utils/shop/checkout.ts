import { and, eq, sql } from 'drizzle-orm'
import { orderEvents, orderItems, orders, products } from '../../db/schema'
import type { CheckoutInput } from '../../../shared/utils/shopSchemas'
import type { Database } from '../platform/db'
import { quoteCart } from './cart'

type CartQuote = Awaited<ReturnType<typeof quoteCart>>

/** What one press of "Go to payment" came to: a new order, the order an earlier press made, or a changed cart. */
export type CheckoutOutcome = { order: OrderRow, quote: CartQuote } | { earlier: OrderRow } | { changes: CartQuote['changes'], quote: CartQuote }

class CheckoutSoldOut extends Error {}

/**
 * Prices the cart from the database, reserves the stock and writes the order in one transaction. A
 * checkout key already used finds the order its first request made; a cart whose prices or stock
 * changed (and was not accepted) is answered with the changes and nothing held.
 */
export async function placeCheckoutOrder(db: Database, input: CheckoutInput, userId: number | null, holdMinutes: number): Promise<CheckoutOutcome> {
  return await db.transaction(async (tx): Promise<CheckoutOutcome> => {
    if (input.checkoutKey) {
      // Requests with one key take turns here, so the second sees the first one's order (if any).
      await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`checkout:${input.checkoutKey}`}))`)
      const [earlier] = await tx.select().from(orders).where(eq(orders.checkoutKey, input.checkoutKey))
      if (earlier) return { earlier }
    }
    // Personal messages are quoted again here (400 naming the field for anything the quote refuses).
    const settings = await getSetting('engine', tx)
    const messages = await prepareCheckoutMessages(tx, input.customMessages ?? [], userId, settings)
    const cartQuote = await quoteCart(tx, { items: input.items ?? [], shipTo: input.shippingAddress })
    if (cartQuote.changes.some(change => change.kind !== 'price' || !input.acceptChanges)) return { changes: cartQuote.changes, quote: cartQuote }
    const quote = quoteWithMessages(cartQuote, messages, settings)
    // Always in product order, so two carts holding the same products cannot deadlock each other.
    for (const line of [...quote.lines].sort((a, b) => a.productId - b.productId)) {
      const [taken] = await tx.update(products).set({ stock: sql`${products.stock} - ${line.qty}` })
        .where(and(eq(products.id, line.productId), sql`${products.stock} >= ${line.qty}`)).returning({ id: products.id })
      if (!taken) throw new CheckoutSoldOut(line.title)
    }
    const [order] = await tx.insert(orders).values({
      userId,
      email: input.email,
      shippingAddress: input.shippingAddress,
      zone: quote.zone,
      taxRegion: quote.taxRegion,
      currency: quote.currency,
      subtotalMinor: quote.subtotalMinor,
      shippingMinor: quote.shippingMinor,
      taxMinor: quote.taxMinor,
      totalMinor: quote.totalMinor,
      reservationExpiresAt: new Date(Date.now() + holdMinutes * 60_000),
      checkoutKey: input.checkoutKey ?? null,
    }).returning()
    if (quote.lines.length) {
      await tx.insert(orderItems).values(quote.lines.map(line => ({
        orderId: order!.id,
        productId: line.productId,
        kind: line.kind,
        title: line.title,
        format: line.format,
        quantity: line.qty,
        unitPriceMinor: line.unitPriceMinor,
        lineTotalMinor: line.lineTotalMinor,
        taxMinor: line.taxMinor,
        madeToOrder: line.madeToOrder,
      })))
    }
    await insertMessageItems(tx, order!.id, messages, quote.messageLines)
    await tx.insert(orderEvents).values({ orderId: order!.id, toStatus: 'awaiting_payment', actorUserId: userId })
    // The payment page lists the messages beside the cart's lines.
    return { order: order!, quote: { ...quote, lines: [...quote.lines, ...quote.messageLines] } }
  }).catch(async (error): Promise<CheckoutOutcome> => {
    if (error instanceof CheckoutSoldOut) {
      throw createError({ statusCode: 409, statusMessage: 'Sold out', message: `Sorry — ${error.message} sold out while you were checking out. Nothing was charged.`, data: { soldOut: true } })
    }
    // Should two requests with one key ever get past the lock (another database), the index still holds.
    if (input.checkoutKey && isUniqueViolation(error, 'checkout_key')) {
      const [earlier] = await db.select().from(orders).where(eq(orders.checkoutKey, input.checkoutKey))
      if (earlier) return { earlier }
    }
    throw error
  })
}

/** The 409 for a cart that changed before payment, with the changes and the new quote for the page. */
export function cartChangedError(changes: CartQuote['changes'], quote: CartQuote) {
  const soldOut = changes.some(change => change.kind !== 'price')
  return createError({
    statusCode: 409,
    statusMessage: soldOut ? 'Sold out' : 'Prices changed',
    message: `Your cart changed before payment: ${changes.map(change => change.message).join(' ')} Please check the new total.`,
    data: { changes, quote, soldOut },
  })
}

/**
 * The order an earlier request with the same checkout key made: the customer gets its payment page
 * again, and no second order or hold is made. The key is only honoured for the same e-mail address.
 */
export async function replayCheckout(order: OrderRow, email: string) {
  if (order.email !== email) throw fieldError('checkoutKey', 'this key belongs to another checkout; reload the page and try again')
  if (order.status !== 'awaiting_payment') {
    throw createError({ statusCode: 409, statusMessage: 'Already checked out', message: `This checkout already went through as order ${order.number} (${order.status.replace(/_/g, ' ')}).`, data: { orderNumber: order.number, status: order.status } })
  }
  let url: string | null | undefined
  if (order.checkoutSessionId) {
    const session = await useStripe().checkout.sessions.retrieve(order.checkoutSessionId).catch(() => null)
    // Paid on the payment page, and the confirmation is on its way: say so, not "press again".
    if (session?.status === 'complete') {
      throw createError({ statusCode: 409, statusMessage: 'Already paid', message: `Order ${order.number} is paid; its confirmation is on its way by e-mail.`, data: { orderNumber: order.number, status: 'paid' } })
    }
    url = session?.url
  }
  else {
    // The first request is still opening the page: the same idempotency key makes this the same page.
    const db = await useDB()
    const items = await db.select().from(orderItems).where(eq(orderItems.orderId, order.id)).orderBy(orderItems.id)
    url = (await createCheckoutSession(order, items.map(item => ({ title: item.title, qty: item.quantity, unitPriceMinor: item.unitPriceMinor })), { releaseOnFailure: false })).url
  }
  if (!url) throw createError({ statusCode: 409, statusMessage: 'Checkout in progress', message: 'This checkout is still being prepared; wait a moment and press the button again.' })
  return { orderNumber: order.number, url, accessToken: orderAccessToken(order.number), replayed: true }
}
