/*
 * POST /api/dispatch/{number}/pack { boxId?, weighedG?, checklist } (shipper or maker) → the order packed,
 * with the engine's packing for the box. Every checklist line that applies must be ticked (400 naming the
 * missing ones); 409 while a heat check holds the order back or when it is not ready to pack.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  const input = await readBodyWith(event, dispatchPackSchema)
  return await packOrder(await useDB(), number, input, user.id)
})
