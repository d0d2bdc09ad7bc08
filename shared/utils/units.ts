import { z } from 'zod'
import type { TemperatureUnit } from './heat'
import {
  celsiusToFahrenheit, defaultUnitPreferences, fahrenheitToCelsius, formatWeight, GRAMS_PER_POUND, lengthUnits,
  OUNCES_PER_POUND, otherTemperature, shopLocales, temperatureUnits, weightUnits,
} from './unitFormat'

/**
 * The shop's units and locale, chosen once in Shop settings and used by every form, table and paper.
 * What is stored never changes unit: temperatures in °C, lengths in inches, weights in grams. Only what a
 * person types and reads follows these preferences, converted on the way in (server) and out (page).
 * The units, conversions and formatters are in the validation-free `unitFormat.ts` (a page that only
 * shows figures loads no zod) and are named here too; the schema and the typed-figure fields are here.
 */
export * from './unitFormat'

export const unitPreferencesSchema = z.object({
  temperature: z.enum(temperatureUnits, { error: 'temperature must be C or F' }).default(defaultUnitPreferences.temperature),
  length: z.enum(lengthUnits, { error: 'length must be in or mm' }).default(defaultUnitPreferences.length),
  weight: z.enum(weightUnits, { error: 'weight must be lb or kg' }).default(defaultUnitPreferences.weight),
  locale: z.enum(shopLocales, { error: `locale must be one of ${shopLocales.join(', ')}` }).default(defaultUnitPreferences.locale),
}).strict()

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
