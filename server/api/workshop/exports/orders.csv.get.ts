export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, orderListQuerySchema)
  const { rows } = await listOrders(await useDB(), query, 50_000)
  const header = ['number', 'status', 'email', 'name', 'created_at', 'currency', 'total', 'refunded']
  const amount = (minor: number, currency: string) => {
    const digits = currencyMinorDigits(currency)
    return (minor / 10 ** digits).toFixed(digits)
  }
  return csvDownload(event, 'orders', header, rows.map(row => [row.number, row.status, row.email, row.name, row.createdAt, row.currency, amount(row.totalMinor, row.currency), amount(row.refundedMinor, row.currency)]))
})
