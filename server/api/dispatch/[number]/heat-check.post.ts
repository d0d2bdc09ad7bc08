/*
 * POST /api/dispatch/{number}/heat-check { forecastHigh, unit: 'C' | 'F' (C), transitDays: 0..14 }
 * (shipper or maker) → { verdict: ok | caution | hold, reasons, nextShipDate, forecastHighC, cautionAtC, holdAtC }
 *
 * The heat risk against the shop's thresholds, kept with the order; a hold keeps it from being packed
 * until nextShipDate. Only for an order ready to pack or packed (409 saying its state otherwise).
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, dispatchOrderParamsSchema)
  const input = await readBodyWith(event, dispatchHeatCheckSchema)
  return await recordHeatCheck(await useDB(), number, input, user.id)
})
