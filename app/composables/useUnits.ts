import type { UnitPreferences } from '#shared/utils/units'

/**
 * The shop's units and locale (Shop settings), fetched once per page load and shared, with the
 * formatters bound to them: every temperature, length, weight, date and count a page shows goes
 * through these, so the whole shop reads in one set of units.
 */
export function useUnits() {
  const { data } = useFetch<UnitPreferences>('/api/shop/units', { key: 'shop-units', getCachedData: (key, nuxtApp) => nuxtApp.payload.data[key] ?? nuxtApp.static.data[key] })
  const prefs = computed<UnitPreferences>(() => data.value ?? defaultUnitPreferences)
  return {
    prefs,
    temperature: (celsius: number, options?: { beside?: boolean }) => formatTemperature(celsius, prefs.value, options),
    length: (inches: number, options?: { beside?: boolean, decimal?: boolean }) => formatLength(inches, prefs.value, options),
    weight: (grams: number, options?: { beside?: boolean }) => formatWeight(grams, prefs.value, options),
    day: (value: string | Date, style?: 'medium' | 'long' | 'short') => formatDay(value, prefs.value.locale, style),
    when: (value: string | Date) => formatWhen(value, prefs.value.locale),
    count: (count: number, one: string, many?: string) => countOf(count, one, many, prefs.value.locale),
  }
}
