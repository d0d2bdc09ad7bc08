/** Corrects a batch: only the fields sent change; a new wax formula recounts the register's blank stock at once. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, waxBatchIdParamsSchema)
  const patch = await readBodyWith(event, waxBatchPatchSchema)
  const db = await useDB()
  await checkWaxFormulaId(db, patch.waxFormulaId)
  checkCastingCounts(await findWaxBatch(db, id), patch)
  return await updateWaxBatch(db, id, patch)
})
