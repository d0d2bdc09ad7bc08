import { GRAMS_PER_POUND } from '#shared/utils/units'

/*
 * How dispatch pages word things: weights in grams with pounds and ounces (or kilograms), the heat
 * verdicts, dates as a packer reads them. No prices: dispatch never shows what an order cost.
 */

export type DispatchTemperatureUnit = 'C' | 'F'
export type DispatchHeatVerdict = 'ok' | 'caution' | 'hold'

/** "1 lb 4.3 oz" for a weight in grams. */
export function poundsAndOunces(grams: number): string {
  const ounces = grams / GRAMS_PER_POUND * 16
  const pounds = Math.floor(ounces / 16)
  const rest = Math.round((ounces - pounds * 16) * 10) / 10
  return rest >= 16 ? `${pounds + 1} lb 0 oz` : pounds > 0 ? `${pounds} lb ${rest} oz` : `${rest} oz`
}

/** A weight for the bench: grams, then pounds and ounces in a °F shop or kilograms in a °C one. */
export function dispatchWeight(grams: number, unit: DispatchTemperatureUnit = 'C'): string {
  const whole = Math.round(grams)
  const other = unit === 'F' ? poundsAndOunces(whole) : `${(whole / 1000).toFixed(2)} kg`
  return `${whole.toLocaleString('en-GB')} g (${other})`
}

/** Box sides in inches, largest first: "12 × 10 × 8 in". */
export function dispatchInches(extent: readonly number[]): string {
  return `${extent.map(side => Number(side.toFixed(1))).join(' × ')} in`
}

/** A plain day (`YYYY-MM-DD`) or a moment as a day: "Mon 7 Dec 2026"; a dash when there is none. */
export function dispatchDay(iso: string | null | undefined): string {
  if (!iso) return '—'
  const at = new Date(iso.length === 10 ? `${iso}T12:00:00Z` : iso)
  return at.toLocaleDateString('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', timeZone: iso.length === 10 ? 'UTC' : undefined })
}

/** A moment with its time: "3 Dec 2026, 16:40". */
export function dispatchMoment(iso: string | null | undefined): string {
  return iso ? new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' }) : '—'
}

export const dispatchFormatLabel = (format: string) => format === 'four_minute' ? '4-minute' : format === 'two_minute' ? '2-minute' : format

export const heatVerdictWords: Record<DispatchHeatVerdict, { label: string, tone: 'ok' | 'warn' | 'bad', text: string }> = {
  ok: { label: 'OK to ship', tone: 'ok', text: 'The forecast is cool enough for wax in transit.' },
  caution: { label: 'Ship with care', tone: 'warn', text: 'Warm on the way: ship early in the week, keep it out of the sun, and mark it "keep cool".' },
  hold: { label: 'Hold the parcel', tone: 'bad', text: 'Too hot for wax in transit: do not pack it now; look again on the date below.' },
}

/** A heavy parcel gets the lifting caution; common practice, no source: about 10 kg. */
export const HEAVY_PARCEL_G = 10_000
