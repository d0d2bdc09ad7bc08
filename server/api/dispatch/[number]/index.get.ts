/*
 * GET /api/dispatch/{number}?boxId= (shipper or maker) → the queue entry plus { boxes, packing, checklist,
 * heatChecks, carriers, shipOn, temperatureUnit }. With `boxId` the engine packs in that outer box; a box
 * that does not take the tubes with the cushioning all round is a 400 naming boxId with the reason.
 * Never a price or a payment.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  const { boxId } = queryWith(event, dispatchBoxQuerySchema)
  return await dispatchDetail(await useDB(), number, boxId)
})
