import { and, eq, sql } from 'drizzle-orm'
import { orderEvents, orderItems, orders, products } from '../../db/schema'

class SoldOut extends Error {}

export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, checkoutSchema)
  const user = await currentUser(event)
  const config = useRuntimeConfig(event)
  const holdMinutes = Number(config.checkoutHoldMinutes)
  const db = await useDB()

  // Price from the database, reserve the stock and write the order in one transaction.
  const outcome = await db.transaction(async (tx) => {
    const quote = await quoteCart(tx, input)
    const blocking = quote.changes.filter(change => change.kind !== 'price' || !input.acceptChanges)
    if (blocking.length > 0) return { changes: quote.changes, quote }
    // Always in product order, so two carts holding the same products cannot deadlock each other.
    for (const line of [...quote.lines].sort((a, b) => a.productId - b.productId)) {
      const [taken] = await tx.update(products).set({ stock: sql`${products.stock} - ${line.qty}` })
        .where(and(eq(products.id, line.productId), sql`${products.stock} >= ${line.qty}`)).returning({ id: products.id })
      if (!taken) throw new SoldOut(line.title)
    }
    const [order] = await tx.insert(orders).values({
      userId: user?.id ?? null,
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
    }).returning()
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
    await tx.insert(orderEvents).values({ orderId: order!.id, toStatus: 'awaiting_payment', actorUserId: user?.id })
    return { order: order!, quote }
  }).catch((error) => {
    if (error instanceof SoldOut) {
      throw createError({ statusCode: 409, statusMessage: 'Sold out', message: `Sorry — ${error.message} sold out while you were checking out. Nothing was charged.`, data: { soldOut: true } })
    }
    throw error
  })

  if (!('order' in outcome) || !outcome.order) {
    const soldOut = outcome.changes.some(change => change.kind !== 'price')
    throw createError({
      statusCode: 409,
      statusMessage: soldOut ? 'Sold out' : 'Prices changed',
      message: `Your cart changed before payment: ${outcome.changes.map(change => change.message).join(' ')} Please check the new total.`,
      data: { changes: outcome.changes, quote: outcome.quote, soldOut },
    })
  }
  const session = await createCheckoutSession(outcome.order, outcome.quote.lines)
  setResponseStatus(event, 201)
  return { orderNumber: outcome.order.number, url: session.url, accessToken: orderAccessToken(outcome.order.number) }
})
