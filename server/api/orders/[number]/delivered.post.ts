/*
 * POST /api/orders/{number}/delivered (the order's owner, or a guest with the signed link `?t=`) → the
 * shipped order delivered, said by the customer. Anyone else: 404. Only from shipped; a second press is a
 * 409 saying it is already delivered.
 */
export default defineEventHandler(async (event) => {
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  const { t } = queryWith(event, orderLinkQuerySchema)
  const db = await useDB()
  const { order, user } = await orderForCustomer(db, event, number, t)
  return await markDelivered(db, order.number, 'customer', user?.id ?? null)
})
