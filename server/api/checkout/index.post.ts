/**
 * POST /api/checkout (anyone): the cart priced by the server, its stock held, the order written, and a
 * payment page opened for it. A repeated press with the same checkout key answers with the first
 * order's page; a cart that changed meanwhile is a 409 with the changes.
 */
export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, checkoutSchema)
  const user = await currentUser(event)
  const outcome = await placeCheckoutOrder(await useDB(), input, user?.id ?? null, checkoutHoldMinutes())
  if ('earlier' in outcome) return await replayCheckout(outcome.earlier, input.email)
  if ('changes' in outcome) throw cartChangedError(outcome.changes, outcome.quote)
  const session = await createCheckoutSession(outcome.order, outcome.quote.lines)
  setResponseStatus(event, 201)
  return { orderNumber: outcome.order.number, url: session.url, accessToken: orderAccessToken(outcome.order.number) }
})
