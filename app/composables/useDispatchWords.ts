/*
 * How dispatch pages word things, in the shop's units (Shop settings): weights with the other unit
 * beside, box sides in inches or millimetres, temperatures, dates in the shop's locale, and the heat
 * verdicts. No prices: dispatch never shows what an order cost.
 */

export type DispatchTemperatureUnit = 'C' | 'F'
export type DispatchHeatVerdict = 'ok' | 'caution' | 'hold'

/** The shop's formatters with the dispatch bench's own: whole grams, box sides, a dash for no date. */
export function useDispatchWords() {
  const units = useUnits()
  return {
    ...units,
    /** `3 lb 3.1 oz (1.45 kg)` or `1.45 kg (3 lb 3.1 oz)` for a weight in grams. */
    dispatchWeight: (grams: number) => units.weight(Math.round(grams)),
    /** Box sides, largest first: `12 × 10 × 8 in` or `305 × 254 × 203 mm`. */
    dispatchSize: (extent: readonly number[]) => units.prefs.value.length === 'mm'
      ? `${extent.map(side => Math.round(inchesToMillimetres(side))).join(' × ')} mm`
      : `${extent.map(side => Number(side.toFixed(1))).join(' × ')} in`,
    /** A plain day (`YYYY-MM-DD`) or a moment as a day; a dash when there is none. */
    dispatchDay: (iso: string | null | undefined) => iso ? units.day(iso) : '—',
    /** A shipping day (`YYYY-MM-DD`) with its weekday, `Mon 7 Dec` or `Mon, Dec 7`; a dash when there is none. */
    shipDay: (iso: string | null | undefined) => iso ? formatShippingDay(iso, units.prefs.value.locale) : '—',
    /** A moment with its time; a dash when there is none. */
    dispatchMoment: (iso: string | null | undefined) => iso ? units.when(iso) : '—',
  }
}

export const dispatchFormatLabel = (format: string) => format === 'four_minute' ? '4-minute' : format === 'two_minute' ? '2-minute' : format

export const heatVerdictWords: Record<DispatchHeatVerdict, { label: string, tone: 'ok' | 'warn' | 'bad', text: string }> = {
  ok: { label: 'OK to ship', tone: 'ok', text: 'The forecast is cool enough for wax in transit.' },
  caution: { label: 'Ship with care', tone: 'warn', text: 'Warm on the way: ship early in the week, keep it out of the sun, and mark it "keep cool".' },
  hold: { label: 'Hold the parcel', tone: 'bad', text: 'Too hot for wax in transit: do not pack it now; look again on the date below.' },
}

/** A heavy parcel gets the lifting caution; common practice, no source: about 10 kg. */
export const HEAVY_PARCEL_G = 10_000
