import { eq } from 'drizzle-orm'
import { waxBatches } from '../../../db/schema'

/** Corrects a batch: only the fields sent change. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, waxBatchIdParamsSchema)
  const patch = await readBodyWith(event, waxBatchPatchSchema)
  const db = await useDB()
  await checkWaxFormulaId(db, patch.waxFormulaId)
  checkCastingCounts(await findWaxBatch(db, id), patch)
  try {
    const [batch] = await db.update(waxBatches).set(patch).where(eq(waxBatches.id, id)).returning()
    return batch!
  }
  catch (error) {
    if (patch.code && isWaxBatchCodeTaken(error)) throw waxBatchCodeTaken(patch.code)
    throw error
  }
})
