/*
 * POST /api/dispatch/{number}/ship { carrier, trackingNumber } (shipper or maker) → the order shipped: its
 * tickets done, their blanks shipped, and one "on its way" mail to the customer with the tracking number
 * and care advice. Only a packed order; a second press is a 409.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  const input = await readBodyWith(event, dispatchShipSchema)
  return await shipOrder(await useDB(), number, input, user.id)
})
