/** The blank register: filter by state, format and batch; search by code; sort; page. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, blankRegisterQuerySchema)
  const db = await useDB()
  return await listBlankRegister(db, query, await getSetting('engine', db))
})
