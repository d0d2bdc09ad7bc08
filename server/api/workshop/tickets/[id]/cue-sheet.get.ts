/** GET /api/workshop/tickets/{id}/cue-sheet (maker): the script with its 15-second marks, the blank and the recorder to use. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  return await ticketCueSheet(await useDB(), id)
})
