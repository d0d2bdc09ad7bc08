import { blankLog, blanks } from '../../../db/schema'

/** Enters `count` new cast blanks of one batch and format, with consecutive codes from the year's counter. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const input = await readBodyWith(event, blankCreateSchema)
  const db = await useDB()
  const batch = await findWaxBatch(db, input.batchId).catch(() => {
    throw fieldError('batchId', `no wax batch has the id ${input.batchId}`)
  })
  const created = await db.transaction(async (tx) => {
    const codes = await drawBlankCodes(tx, input.count)
    const rows = await tx.insert(blanks).values(codes.map(code => ({
      code,
      batchId: batch.id,
      format: input.format,
      diameterIn: input.diameterIn ?? null,
      // Where a new blank usually waits, unless the maker says where it is.
      location: input.location || blankUsualPlaces.cast,
    }))).returning({ id: blanks.id, code: blanks.code, state: blanks.state })
    await tx.insert(blankLog).values(rows.map(row => ({
      blankId: row.id,
      kind: 'state' as const,
      data: { from: null, to: 'cast', reason: `cast from batch ${batch.code}` } satisfies BlankStateLogData,
      byUserId: maker.id,
    })))
    return rows
  })
  setResponseStatus(event, 201)
  return { batchCode: batch.code, format: input.format, codes: created.map(row => row.code) }
})
