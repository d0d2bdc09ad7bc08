/*
 * POST /api/dispatch/{number}/delivered (shipper or maker) → the shipped order delivered. Only from
 * shipped: a second press is a 409 saying it is already delivered.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  return await markDelivered(await useDB(), number, 'shipper', user.id)
})
