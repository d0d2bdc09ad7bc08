/*
 * GET /api/orders/{number}/claims/{id}/photos/{index} (the order's owner, a guest with `?t=`, or the
 * maker) → photo `index` (from 0) of the claim; 404 to anyone else.
 */
export default defineEventHandler(async (event) => {
  const { number, id, index } = paramsWith(event, claimPhotoParamsSchema)
  const { t } = queryWith(event, orderLinkQuerySchema)
  const file = await claimPhotoFile(event, number, id, index, t)
  return await sendStoredFile(event, file)
})
