import type { UnitPreferences } from '#shared/utils/units'

/** A kind of figure a form edits, by what is stored: °C, °F, a step of °C, grams. */
export type EditedFigure = 'celsius' | 'fahrenheit' | 'celsiusStep' | 'grams'

/** Whether a kind of figure is one of those kept in a stored unit and edited in the shop's. */
export const isEditedFigure = (kind: string): kind is EditedFigure => kind === 'celsius' || kind === 'fahrenheit' || kind === 'celsiusStep' || kind === 'grams'

/** A figure as a form shows it for editing: plain, at most `digits` decimals, no trailing zeros. */
const plain = (value: number, digits: number) => String(Number(value.toFixed(digits)))

/** A stored figure in the shop's unit, as the text a form prefills (302 for 150 °C in a °F shop). */
export function editedFigure(stored: number, kind: EditedFigure, prefs: Pick<UnitPreferences, 'temperature' | 'weight'>): string {
  switch (kind) {
    case 'celsius': return plain(fromCelsius(stored, prefs.temperature), 2)
    case 'fahrenheit': return plain(prefs.temperature === 'F' ? stored : fahrenheitToCelsius(stored), 2)
    case 'celsiusStep': return plain(prefs.temperature === 'F' ? stored * 1.8 : stored, 2)
    case 'grams': return plain(prefs.weight === 'kg' ? stored / 1000 : gramsToPounds(stored), 4)
  }
}

/** The shop's unit of a kind of figure, as a label shows it: °F, °C, lb, kg. */
export function figureUnit(kind: EditedFigure, prefs: Pick<UnitPreferences, 'temperature' | 'weight'>): string {
  return kind === 'grams' ? prefs.weight : `°${prefs.temperature}`
}

/** What a form sends for a typed figure: the text with the shop's unit, unless the text names one itself. */
export function typedWithUnit(text: string, kind: EditedFigure, prefs: Pick<UnitPreferences, 'temperature' | 'weight'>): string {
  const trimmed = text.trim()
  if (trimmed === '' || /[a-z°º]/i.test(trimmed)) return trimmed
  return `${trimmed} ${kind === 'grams' ? prefs.weight : prefs.temperature}`
}

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
    /** Editing a stored figure: its text in the shop's unit, the unit's label, what to send for a typed text. */
    edited: (stored: number, kind: EditedFigure) => editedFigure(stored, kind, prefs.value),
    unitOf: (kind: EditedFigure) => figureUnit(kind, prefs.value),
    typed: (text: string, kind: EditedFigure) => typedWithUnit(text, kind, prefs.value),
  }
}
