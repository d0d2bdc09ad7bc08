/*
 * POST /api/workshop/claims/{id}/resolve { action: replace | refund | decline, note, amountMinor? } (maker)
 * → the claim's one answer (409 after): new production tickets for the broken items, a refund through the
 * shop's refund flow (by default the broken items' value), or a decline; the customer is mailed.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const input = await readBodyWith(event, claimResolutionSchema)
  return await resolveClaim(await useDB(), id, input, maker.id)
})
