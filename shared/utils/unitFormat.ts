import type { TemperatureUnit } from './heat'

/**
 * The shop's units and the pure conversions and formatters that read stored figures in them, with no
 * validation library behind them, so any page (the public shop above all) can format a figure without
 * carrying form-parsing code. What is stored never changes unit: temperatures in °C, lengths in inches,
 * weights in grams. The typed-figure fields built on these live in `units.ts`.
 */
export const lengthUnits = ['in', 'mm'] as const
export const weightUnits = ['lb', 'kg'] as const
export const temperatureUnits = ['C', 'F'] as const
export type LengthUnit = typeof lengthUnits[number]
export type WeightUnit = typeof weightUnits[number]

/** Locales the shop can show dates and numbers in (Intl does the work; the list keeps typos out). */
export const shopLocales = ['en-GB', 'en-US', 'en-CA', 'en-AU', 'en-IE', 'en-NZ'] as const
export type ShopLocale = typeof shopLocales[number]

export interface UnitPreferences {
  temperature: TemperatureUnit
  length: LengthUnit
  weight: WeightUnit
  locale: ShopLocale
}

/** The defaults suit a shop pricing in US dollars, as the demo does; a shop elsewhere sets its own. */
export const defaultUnitPreferences: UnitPreferences = { temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' }

/** 1 in = 25.4 mm exactly (NIST). */
export const MILLIMETRES_PER_INCH = 25.4
/** The finest fraction the trade's rules are marked in. */
export const INCH_FRACTION_DENOMINATOR = 64
/** Exact by definition: the international avoirdupois pound is 0.453 592 37 kg (1959 agreement). */
export const GRAMS_PER_POUND = 453.59237
export const OUNCES_PER_POUND = 16

export function inchesToMillimetres(inches: number): number {
  return inches * MILLIMETRES_PER_INCH
}

export function millimetresToInches(millimetres: number): number {
  return millimetres / MILLIMETRES_PER_INCH
}

const greatestDivisor = (a: number, b: number): number => b === 0 ? a : greatestDivisor(b, a % b)

/** The nearest 1/64 in, reduced, the way a rule is read: `1 3/16`, `7/16`, `2`, `0`. */
export function formatInchFraction(inches: number): string {
  const sixtyFourths = Math.round(inches * INCH_FRACTION_DENOMINATOR)
  const sign = sixtyFourths < 0 ? '-' : ''
  const whole = Math.floor(Math.abs(sixtyFourths) / INCH_FRACTION_DENOMINATOR)
  const rest = Math.abs(sixtyFourths) % INCH_FRACTION_DENOMINATOR
  if (rest === 0) return `${sign}${whole}`
  const divisor = greatestDivisor(rest, INCH_FRACTION_DENOMINATOR)
  const fraction = `${rest / divisor}/${INCH_FRACTION_DENOMINATOR / divisor}`
  return whole === 0 ? `${sign}${fraction}` : `${sign}${whole} ${fraction}`
}

/** Whether `inches` is exactly a multiple of 1/64 in (so its fraction is not an approximation). */
export function isWholeSixtyFourth(inches: number): boolean {
  // Scaling by a power of two is exact in floating point, so this test is too.
  return Number.isInteger(inches * INCH_FRACTION_DENOMINATOR)
}

export function fahrenheitToCelsius(fahrenheit: number): number {
  return ((fahrenheit - 32) * 5) / 9
}

export function celsiusToFahrenheit(celsius: number): number {
  return (celsius * 9) / 5 + 32
}

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

export const otherTemperature = (unit: TemperatureUnit): TemperatureUnit => unit === 'C' ? 'F' : 'C'

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
