/** GET /api/workshop/tickets (maker): the production board, filtered and a page at a time (see ticketBoard). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  return await ticketBoard(await useDB(), queryWith(event, ticketBoardQuerySchema))
})
