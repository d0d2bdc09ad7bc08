const csvCell = (value: unknown) => {
  const text = value instanceof Date ? value.toISOString() : String(value ?? '')
  // Quote every cell, and defuse cells a spreadsheet would run as a formula.
  return `"${(/^[=+\-@\t\r]/.test(text) ? `'${text}` : text).replace(/"/g, '""')}"`
}

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, orderListQuerySchema)
  const { rows } = await listOrders(await useDB(), query, 50_000)
  const header = ['number', 'status', 'email', 'name', 'created_at', 'currency', 'total', 'refunded']
  const amount = (minor: number, currency: string) => {
    const digits = currencyMinorDigits(currency)
    return (minor / 10 ** digits).toFixed(digits)
  }
  const lines = rows.map(row => [row.number, row.status, row.email, row.name, row.createdAt, row.currency, amount(row.totalMinor, row.currency), amount(row.refundedMinor, row.currency)].map(csvCell).join(','))
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="orders-${new Date().toISOString().slice(0, 10)}.csv"`)
  return [header.join(','), ...lines].join('\r\n') + '\r\n'
})
