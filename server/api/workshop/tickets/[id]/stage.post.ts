/** A stage change by the transition table (shared/utils/ticketLifecycle.ts), or `recut`; 409 says why a move is refused. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const change = await readBodyWith(event, ticketStageChangeSchema)
  return await changeTicketStage(await useDB(), id, change, maker.id)
})
