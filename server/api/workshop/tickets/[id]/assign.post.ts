/** Ties a tested blank to the ticket; 409 with the reason when the blank may not go to it. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const { blankCode } = await readBodyWith(event, ticketAssignSchema)
  return await assignBlankToTicket(await useDB(), id, blankCode, maker.id)
})
