import { eq } from 'drizzle-orm'
import { blanks, orderItems, orders, recorders, tickets, waxBatches } from '../../../../db/schema'

/** One ticket: its order and item, its blank with the test that makes it fit, the recorder, the log and the moves open. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const db = await useDB()
  const [row] = await db.select({ ticket: tickets, order: orders, item: orderItems }).from(tickets)
    .innerJoin(orders, eq(orders.id, tickets.orderId))
    .innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .where(eq(tickets.id, id))
  if (!row) throw notFoundError('No such ticket.')
  const { ticket, order, item } = row
  const [blankRow] = ticket.blankId
    ? await db.select({ blank: blanks, batchCode: waxBatches.code }).from(blanks).innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId)).where(eq(blanks.id, ticket.blankId))
    : []
  const surfaceTest = blankRow ? await latestCurrentSurfaceTest(db, blankRow.blank) : null
  const [recorder] = ticket.recorderId ? await db.select().from(recorders).where(eq(recorders.id, ticket.recorderId)) : []
  const kind = ticketKindOf(item.kind)
  return {
    ...ticket,
    kind,
    order: { number: order.number, status: order.status, customer: order.shippingAddress.name, paidAt: order.paidAt },
    item: { title: item.title, quantity: item.quantity, format: item.format },
    wantedWax: (await shopWaxFormulas(db)).label(await ticketWantedFormula(db, ticket)),
    blank: blankRow ? { code: blankRow.blank.code, state: blankRow.blank.state, diameterIn: blankRow.blank.diameterIn, surface: blankRow.blank.surfacesUsed + 1, batchCode: blankRow.batchCode } : null,
    surfaceTest: surfaceTest && { aWeightedDbfs: surfaceTest.aWeightedDbfs, rotaryDb: surfaceTest.rotaryDb, clicksPerMinute: surfaceTest.clicksPerMinute, finalVerdict: surfaceTest.finalVerdict, testedAt: surfaceTest.testedAt },
    recorder: recorder ? { id: recorder.id, name: recorder.name } : null,
    suggestedRecorder: suggestedRecorder(await rankRecorders(db)),
    // A message's proof goes out by uploading it (the proof form), not by a stage change.
    moves: ticketMovesFrom({ stage: ticket.stage, kind }, order.status).filter(rule => rule.route === 'stage' && !(kind === 'custom' && rule.to === 'proof_sent')),
    message: messageSummaryForTicket((await ticketMessage(db, ticket.id))?.message ?? null),
    events: await ticketHistory(db, ticket.id),
  }
})
