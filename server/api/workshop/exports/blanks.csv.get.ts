/** The blank register as CSV, with the same filters and order as the table (every page). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, blankRegisterQuerySchema)
  const db = await useDB()
  const { rows } = await listBlankRegister(db, query, await getSetting('engine', db), 50_000)
  const header = ['code', 'batch', 'format', 'state', 'diameter_in', 'surfaces_used', 'surfaces_left', 'location', 'latest_test_verdict', 'latest_test_a_weighted_dbfs', 'updated_at']
  return csvDownload(event, 'blanks', header, rows.map(row => [
    row.code,
    row.batchCode,
    row.format,
    row.state,
    row.diameterIn === null ? '' : row.diameterIn.toFixed(4),
    row.surfacesUsed,
    row.surfacesLeft ?? '',
    row.location,
    row.latestTest?.finalVerdict ?? '',
    row.latestTest ? row.latestTest.aWeightedDbfs.toFixed(1) : '',
    row.updatedAt,
  ]))
})
