/*
 * GET /api/workshop/claims?status=open|replaced|refunded|declined|all (maker) → { claims: [...] } newest
 * first, with the order number, the customer's e-mail, the items reported, the description, photo
 * addresses, the status and dates.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { status } = queryWith(event, claimStatusFilterSchema)
  return { claims: await listClaims(await useDB(), status) }
})
