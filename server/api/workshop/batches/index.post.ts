import { waxBatches } from '../../../db/schema'

/** A new wax batch: its code, the formula as the maker writes it, pour date and the wax's heat figures. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const input = await readBodyWith(event, waxBatchCreateSchema)
  const db = await useDB()
  await checkWaxFormulaId(db, input.waxFormulaId)
  // The unique index on the code decides between two makers choosing the same code.
  const [batch] = await db.insert(waxBatches).values(input).onConflictDoNothing().returning()
  if (!batch) throw waxBatchCodeTaken(input.code)
  setResponseStatus(event, 201)
  return batch
})
