import { heatChecks } from '../../db/schema'
import type { EngineSettings } from '#shared/utils/engineSettings'
import type { UnitPreferences } from '#shared/utils/units'
import type { Database } from '../platform/db'

/**
 * The verdict of a heat check and the day the parcel may go: for ok and caution the first day from
 * `today` the shop ships on, early in the week so it arrives before the weekend; for a hold the first
 * shipping day on or after today + the shop's recheck days. The reasons are kept as written, in the shop's
 * units and locale (`words`) at the time of the check.
 */
export function heatCheckOutcome(input: DispatchHeatCheckInput, settings: EngineSettings, today = dispatchToday(), words: Pick<UnitPreferences, 'temperature' | 'locale'> = celsiusHeatWords) {
  const risk = heatRisk({ forecastHigh: input.forecastHigh, unit: input.unit, daysInTransit: input.transitDays }, settings, words)
  const weekdays = shippingWeekdays(settings.dispatch.shipOn)
  const from = risk.level === 'hold' ? addCalendarDays(today, settings.dispatch.heatRecheckDays) : today
  const nextShipDate = nextShippingDay(from, weekdays, { daysInTransit: input.transitDays })
  const reasons = [...risk.reasons]
  if (risk.level === 'hold') reasons.push(`Check again on or after ${formatShippingDay(nextShipDate, words.locale)}, the first shipping day ${countOf(settings.dispatch.heatRecheckDays, 'day')} from now.`)
  return {
    verdict: risk.level,
    reasons,
    nextShipDate,
    forecastHighC: Math.round(risk.forecastHighC * 10) / 10,
    cautionAtC: Math.round(risk.cautionAtC * 10) / 10,
    holdAtC: Math.round(risk.holdAtC * 10) / 10,
  }
}

/** Records a heat check of an order that is ready to pack or packed (409 otherwise) and returns its verdict. */
export async function recordHeatCheck(db: Database, number: string, input: DispatchHeatCheckInput, userId: number) {
  const settings = await getSetting('engine', db)
  const words = await getSetting('units', db)
  return await db.transaction(async (tx) => {
    const order = await lockDispatchOrder(tx, number)
    if (order.status !== 'ready_to_pack' && order.status !== 'packed') {
      throw dispatchStateError(order.number, order.status, 'only an order ready to pack or packed is checked for heat')
    }
    const outcome = heatCheckOutcome(input, settings, dispatchToday(), words)
    await tx.insert(heatChecks).values({
      orderId: order.id,
      forecastHigh: input.forecastHigh,
      unit: input.unit,
      forecastHighC: outcome.forecastHighC,
      transitDays: input.transitDays,
      verdict: outcome.verdict,
      reasons: outcome.reasons,
      nextShipDate: outcome.nextShipDate,
      checkedBy: userId,
    })
    return outcome
  })
}
