const csvCell = (value: unknown) => {
  const text = value instanceof Date ? value.toISOString() : String(value ?? '')
  // Quote every cell, and defuse cells a spreadsheet would run as a formula (a plain negative number is not one).
  const formulaLike = /^[=+\-@\t\r]/.test(text) && !/^-\d+(\.\d+)?$/.test(text)
  return `"${(formulaLike ? `'${text}` : text).replace(/"/g, '""')}"`
}

/** The blank register as CSV, with the same filters and order as the table (every page). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, blankRegisterQuerySchema)
  const db = await useDB()
  const { rows } = await listBlankRegister(db, query, await getSetting('engine', db), 50_000)
  const header = ['code', 'batch', 'format', 'state', 'diameter_in', 'surfaces_used', 'surfaces_left', 'location', 'latest_test_verdict', 'latest_test_a_weighted_dbfs', 'updated_at']
  const lines = rows.map(row => [
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
  ].map(csvCell).join(','))
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="blanks-${new Date().toISOString().slice(0, 10)}.csv"`)
  return [header.join(','), ...lines].join('\r\n') + '\r\n'
})
