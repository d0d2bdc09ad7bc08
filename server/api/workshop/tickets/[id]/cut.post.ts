import { eq } from 'drizzle-orm'
import { orderItems, products, tickets } from '../../../../db/schema'

/**
 * Records the cut: `{ recorderId, cutAt?, notes? }` as JSON, or the same fields as multipart with the
 * cut's own test recording in `file` (analysed and kept as a test cut of that recorder and blank).
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const multipart = /^multipart\/form-data/i.test(getRequestHeader(event, 'content-type') ?? '')
  const upload = multipart ? await readUploadForm(event, 'audio') : null
  const parsed = ticketCutSchema.safeParse(upload ? upload.fields : await readBody(event).catch(() => null) ?? {})
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!
    throw fieldError(issue.path.map(String).join('.') || 'body', issue.message)
  }
  const input = parsed.data
  const db = await useDB()
  const recorder = await findRecorder(db, input.recorderId)
  if (!recorder.inService) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `recorderId: ${recorder.name} is out of service; choose a recorder in service.`, data: { fields: { recorderId: 'out of service' } } })
  const [product] = await db.select({ rpm: products.rpm }).from(tickets).innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .innerJoin(products, eq(products.id, orderItems.productId)).where(eq(tickets.id, id))
  const analysis = upload?.file ? await analyseTestCut(upload.file.data, product?.rpm ?? 160, await testCutThresholds(db)) : null
  const cutAt = input.cutAt ? new Date(input.cutAt) : new Date()

  return await db.transaction(async (tx) => {
    const { ticket, order, kind } = await lockTicketForMove(tx, id)
    const problem = ticketMoveProblem({ id: ticket.id, stage: ticket.stage, kind }, 'cut', order.status, 'cut')
    if (problem) throw conflictError(problem)
    const blank = await blankReadyForCut(tx, ticket)
    const testCut = upload?.file && analysis
      ? await storeTestCut(tx, { bytes: upload.file.data, name: fileLabel(upload.file.filename, 'test-cut.wav'), analysis, recorderId: recorder.id, blankId: blank.id, notes: input.notes || `The cut of ticket #${ticket.id}.`, cutAt, userId: maker.id })
      : null
    await markTicketCut(tx, ticket, blank, { recorderId: recorder.id, recorderName: recorder.name, cutAt, testCutId: testCut?.id ?? null, note: input.notes }, maker.id)
    return { id: ticket.id, stage: 'cut' as const, blankCode: blank.code, recorderName: recorder.name, cutAt, testCut: testCut && { id: testCut.id, aWeightedDbfs: testCut.aWeightedDbfs, clicksPerMinute: testCut.clicksPerMinute, verdict: testCut.verdict } }
  })
})
