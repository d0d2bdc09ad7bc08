/*
 * POST /api/orders/{number}/claims (the order's owner, or a guest with `?t=`) multipart: description
 * (10–2000 characters), itemIds (optional, comma-separated item ids of this order), 1–6 photos in the field
 * `photos` (JPEG, PNG or WebP by content, ≤ 8 MB each) → 201 the claim. Only on a delivered order within
 * the shop's claim window (409 with data.lastDate); another customer's order 404; nothing is stored when
 * anything is refused.
 */
export default defineEventHandler(async (event) => {
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  const { t } = queryWith(event, orderLinkQuerySchema)
  return await createClaim(event, number, t)
})
