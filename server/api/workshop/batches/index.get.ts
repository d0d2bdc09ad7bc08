/** Every wax batch with its blanks counted and its yield (blanks passed ÷ blanks tested). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  return await listWaxBatchesWithYield(await useDB())
})
