import { z } from 'zod'
import type { TemperatureUnit } from './heat'
import { formatInchFraction, inchesToMillimetres, isWholeSixtyFourth, millimetresToInches } from './length'

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
  // The defaults suit a shop pricing in US dollars, as the demo does; a shop elsewhere sets its own.
  temperature: z.enum(temperatureUnits, { error: 'temperature must be C or F' }).default('F'),
  length: z.enum(lengthUnits, { error: 'length must be in or mm' }).default('in'),
  weight: z.enum(weightUnits, { error: 'weight must be lb or kg' }).default('lb'),
  locale: z.enum(shopLocales, { error: `locale must be one of ${shopLocales.join(', ')}` }).default('en-US'),
}).strict()

export type UnitPreferences = z.infer<typeof unitPreferencesSchema>
export const defaultUnitPreferences: UnitPreferences = unitPreferencesSchema.parse({})

/** Exact by definition: the international avoirdupois pound is 0.453 592 37 kg (1959 agreement). */
export const GRAMS_PER_POUND = 453.59237
export const OUNCES_PER_POUND = 16

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

// ——— typed figures with their unit, converted on the server ———

const TEMPERATURE_TEXT = /^([-−+]?\d+(?:[.,]\d+)?|[-−+]?[.,]\d+)\s*(?:°|º|deg(?:rees?)?)?\s*([cf])?$/i
const FIGURE_TEXT_MAX_CHARS = 40

/** A number a person typed, with a typographic minus or a decimal comma accepted. */
const typedNumber = (text: string) => Number(text.replace('−', '-').replace(',', '.'))

/**
 * A zod field for a temperature stored in `stored` (°C or °F): a number is already in that unit; a
 * text may carry its unit (`92 °F`, `92F`, `33.5 C`, `33,5`) and is converted. Bounds are in the
 * stored unit and each message gives them in both, naming the field. A `difference` (a step of so many
 * degrees, not a reading) converts by the size of a degree alone: 1 °C step = 1.8 °F step.
 */
export function temperatureField(name: string, options: { stored: TemperatureUnit, min: number, max: number, difference?: boolean }) {
  const convert = (value: number, to: TemperatureUnit) => {
    if (to === options.stored) return value
    if (options.difference) return to === 'F' ? value * 1.8 : value / 1.8
    return to === 'F' ? celsiusToFahrenheit(value) : fahrenheitToCelsius(value)
  }
  const both = (value: number) => {
    const other = otherTemperature(options.stored)
    return `${value} °${options.stored} (${Number(convert(value, other).toFixed(1))} °${other})`
  }
  return z
    .union([z.number(), z.string()], { error: issue => issue.input === undefined ? `${name} is required` : `${name} must be a temperature such as 21 or 70 °F` })
    .transform((raw, ctx) => {
      const fail = (message: string) => {
        ctx.addIssue({ code: 'custom', message })
        return z.NEVER
      }
      let value: number
      if (typeof raw === 'number') {
        value = raw
      }
      else {
        const text = raw.trim()
        const match = text.length <= FIGURE_TEXT_MAX_CHARS ? TEMPERATURE_TEXT.exec(text) : null
        if (!match) return fail(`${name} must be a temperature such as 21, 21 °C or 70 °F, got "${text.slice(0, FIGURE_TEXT_MAX_CHARS)}"`)
        const typedUnit = (match[2]?.toUpperCase() ?? options.stored) as TemperatureUnit
        const typed = typedNumber(match[1]!)
        // Typed in the other unit: read it in that unit's scale, then take it to the stored one.
        value = typedUnit === options.stored ? typed : options.difference ? (options.stored === 'C' ? typed / 1.8 : typed * 1.8) : options.stored === 'C' ? fahrenheitToCelsius(typed) : celsiusToFahrenheit(typed)
      }
      if (!Number.isFinite(value)) return fail(`${name} must be a number`)
      if (value < options.min) return fail(`${name} must be at least ${both(options.min)}: check the figure and its unit`)
      if (value > options.max) return fail(`${name} must be at most ${both(options.max)}: check the figure and its unit`)
      return Number(value.toFixed(4))
    })
}

const WEIGHT_PART = /(\d+(?:[.,]\d+)?|[.,]\d+)\s*(kg|g|lb|lbs|oz)\b/gi
const GRAMS_PER_UNIT: Record<string, number> = { kg: 1000, g: 1, lb: GRAMS_PER_POUND, lbs: GRAMS_PER_POUND, oz: GRAMS_PER_POUND / OUNCES_PER_POUND }

/** Grams from a typed weight: `575`, `575 g`, `1.2 kg`, `2 lb 4 oz`, `20 oz`; null when it is not one. */
export function parseWeightGrams(text: string): number | null {
  const trimmed = text.trim()
  if (trimmed === '' || trimmed.length > FIGURE_TEXT_MAX_CHARS) return null
  if (/^\d+(?:[.,]\d+)?$/.test(trimmed)) return typedNumber(trimmed)
  let grams = 0
  let rest = trimmed
  for (const match of trimmed.matchAll(WEIGHT_PART)) {
    grams += typedNumber(match[1]!) * GRAMS_PER_UNIT[match[2]!.toLowerCase()]!
    rest = rest.replace(match[0], '')
  }
  return rest.trim() === '' && rest !== trimmed ? grams : null
}

/** A zod field for a weight stored in grams, typed as a number of grams or with units (see `parseWeightGrams`). */
export function weightField(name: string, options: { max: number, min?: number }) {
  const min = options.min ?? 0
  const label = (grams: number) => `${Number(grams.toFixed(1))} g (${formatWeight(grams, { weight: 'lb', locale: 'en-GB' }, { beside: false })})`
  return z
    .union([z.number(), z.string()], { error: issue => issue.input === undefined ? `${name} is required` : `${name} must be a weight such as 575 g or 1 lb 4 oz` })
    .transform((raw, ctx) => {
      const grams = typeof raw === 'number' ? raw : parseWeightGrams(raw)
      const fail = (message: string) => {
        ctx.addIssue({ code: 'custom', message })
        return z.NEVER
      }
      if (grams === null || !Number.isFinite(grams)) return fail(`${name} must be a weight such as 575, 575 g, 1.2 kg or 1 lb 4 oz`)
      if (grams < min) return fail(min === 0 ? `${name} cannot be negative` : `${name} must be at least ${label(min)}`)
      if (grams > options.max) return fail(`${name} must be at most ${label(options.max)}: check the figure and its unit`)
      return Number(grams.toFixed(3))
    })
}
