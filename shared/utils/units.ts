import { z } from 'zod'
import { celsiusToFahrenheit } from './heat'
import type { TemperatureUnit } from './heat'
import { formatInchFraction, inchesToMillimetres, isWholeSixtyFourth, millimetresToInches } from './length'
import { GRAMS_PER_POUND } from './packing'

/**
 * The shop's units and locale, chosen once in Shop settings and used by every form, table and paper.
 * What is stored never changes unit: temperatures in °C, lengths in inches, weights in grams. Only what a
 * person types and reads follows these preferences, converted on the way in (server) and out (page).
 */
export const lengthUnits = ['in', 'mm'] as const
export const weightUnits = ['lb', 'kg'] as const
export const temperatureUnits = ['C', 'F'] as const
export type LengthUnit = typeof lengthUnits[number]
export type WeightUnit = typeof weightUnits[number]

/** Locales the shop can show dates and numbers in (Intl does the work; the list keeps typos out). */
export const shopLocales = ['en-GB', 'en-US', 'en-CA', 'en-AU', 'en-IE', 'en-NZ'] as const

export const unitPreferencesSchema = z.object({
  temperature: z.enum(temperatureUnits, { error: 'temperature must be C or F' }).default('C'),
  length: z.enum(lengthUnits, { error: 'length must be in or mm' }).default('in'),
  weight: z.enum(weightUnits, { error: 'weight must be lb or kg' }).default('kg'),
  locale: z.enum(shopLocales, { error: `locale must be one of ${shopLocales.join(', ')}` }).default('en-GB'),
}).strict()

export type UnitPreferences = z.infer<typeof unitPreferencesSchema>
export const defaultUnitPreferences: UnitPreferences = unitPreferencesSchema.parse({})

export const OUNCES_PER_POUND = 16

export function gramsToPounds(grams: number): number {
  return grams / GRAMS_PER_POUND
}

export function poundsToGrams(pounds: number): number {
  return pounds * GRAMS_PER_POUND
}

/** Pounds and ounces as a scale shows them: whole pounds and ounces to one decimal, 16 oz carried. */
export function gramsToPoundsOunces(grams: number): { pounds: number, ounces: number } {
  const totalOunces = Math.round((gramsToPounds(grams) * OUNCES_PER_POUND) * 10) / 10
  const pounds = Math.floor(totalOunces / OUNCES_PER_POUND)
  const ounces = Math.round((totalOunces - pounds * OUNCES_PER_POUND) * 10) / 10
  return { pounds, ounces }
}

// A temperature given in either unit goes to °C (what is stored) with `temperatureInCelsius` (heat.ts).

/** A stored °C figure in the unit a person reads. */
export function fromCelsius(celsius: number, unit: TemperatureUnit): number {
  return unit === 'C' ? celsius : celsiusToFahrenheit(celsius)
}

/** A length given in either unit, in inches (what is stored). */
export function toInches(value: number, unit: LengthUnit): number {
  return unit === 'in' ? value : millimetresToInches(value)
}

/** A weight given in either unit (kilograms or pounds), in grams (what is stored). */
export function toGrams(value: number, unit: WeightUnit): number {
  return unit === 'kg' ? value * 1000 : poundsToGrams(value)
}

const otherTemperature = (unit: TemperatureUnit): TemperatureUnit => unit === 'C' ? 'F' : 'C'

function numberIn(locale: string, value: number, digits: number): string {
  return new Intl.NumberFormat(locale, { maximumFractionDigits: digits, minimumFractionDigits: 0 }).format(value)
}

/** `32 °C (89.6 °F)` with the shop's unit first and the other beside it; `beside: false` leaves it out. */
export function formatTemperature(celsius: number, prefs: Pick<UnitPreferences, 'temperature' | 'locale'>, options: { beside?: boolean } = {}): string {
  const main = `${numberIn(prefs.locale, fromCelsius(celsius, prefs.temperature), 1)} °${prefs.temperature}`
  if (options.beside === false) return main
  const other = otherTemperature(prefs.temperature)
  return `${main} (${numberIn(prefs.locale, fromCelsius(celsius, other), 1)} °${other})`
}

/**
 * A length in the shop's unit with the other beside: `2 3/16 in (55.56 mm)` or `55.56 mm (2 3/16 in)`.
 * Inches are read as a rule's fraction (nearest 1/64, `≈` when rounded) unless `decimal` is asked.
 */
export function formatLength(inches: number, prefs: Pick<UnitPreferences, 'length' | 'locale'>, options: { beside?: boolean, decimal?: boolean } = {}): string {
  const mm = `${numberIn(prefs.locale, inchesToMillimetres(inches), 2)} mm`
  const inch = options.decimal
    ? `${numberIn(prefs.locale, inches, 3)} in`
    : `${isWholeSixtyFourth(inches) ? '' : '≈ '}${formatInchFraction(inches)} in`
  const [main, other] = prefs.length === 'in' ? [inch, mm] : [mm, inch]
  return options.beside === false ? main : `${main} (${other})`
}

/** A weight in the shop's unit with the other beside: `1 lb 4.3 oz (575 g)` or `575 g (1 lb 4.3 oz)`. */
export function formatWeight(grams: number, prefs: Pick<UnitPreferences, 'weight' | 'locale'>, options: { beside?: boolean } = {}): string {
  const metric = grams >= 1000
    ? `${numberIn(prefs.locale, grams / 1000, 2)} kg`
    : `${numberIn(prefs.locale, grams, 0)} g`
  const { pounds, ounces } = gramsToPoundsOunces(grams)
  const imperial = pounds > 0 ? `${pounds} lb ${numberIn(prefs.locale, ounces, 1)} oz` : `${numberIn(prefs.locale, ounces, 1)} oz`
  const [main, other] = prefs.weight === 'kg' ? [metric, imperial] : [imperial, metric]
  return options.beside === false ? main : `${main} (${other})`
}
