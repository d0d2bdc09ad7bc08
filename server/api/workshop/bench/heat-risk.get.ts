/*
 * GET /api/workshop/bench/heat-risk?high=31&unit=C&days=2 (maker)
 * → { level: 'ok' | 'caution' | 'hold', forecastHighC, cautionAtC, holdAtC, reasons, shipOn }
 *
 * Heat risk of a parcel from the destination's forecast high and the days in transit, against the
 * shop's thresholds (both drop a little for each extra day in a van). `shipOn` is the next Monday or
 * Tuesday from which the parcel still arrives by Friday, since shipping early in the week keeps it out
 * of a depot over the weekend. The reasons give temperatures in the shop's unit (Shop settings).
 */

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, heatRiskQuerySchema)
  const settings = await getSetting('engine')
  const words = await getSetting('units')
  try {
    const risk = benchHeatRisk(query, settings, words)
    const today = new Date().toISOString().slice(0, 10)
    return {
      ...risk,
      forecastHighC: Math.round(risk.forecastHighC * 10) / 10,
      shipOn: nextEarlyWeekShippingDay(today, { daysInTransit: query.days }),
    }
  }
  catch (error) {
    // The schema refuses what the engine would; this keeps a case it misses a 400 rather than a 500.
    if (error instanceof RangeError) throw fieldError(/days/.test(error.message) ? 'days' : 'high', error.message)
    throw error
  }
})
