import Fraction from 'fraction.js'
import { z } from 'zod'

import { formatInchFraction, inchesToMillimetres, isWholeSixtyFourth } from './unitFormat'

// The plain conversions and the rule fraction live in the validation-free unitFormat.ts (pages format
// lengths without this parser); they can be imported from here too by the code that reads lengths.
export * from './unitFormat'

/** "1 3/16 in", "11.1 mm" and their like are short; a longer text is not a reading. */
const LENGTH_TEXT_MAX_CHARS = 40

const LENGTH_HINT = 'expected inches like 7/16, 1 3/16, 0.4375 or millimetres like 11.1 mm'

export class LengthParseError extends Error {
  readonly input: string

  constructor(input: string, reason: string) {
    super(`"${input}" is not a length: ${reason}`)
    this.name = 'LengthParseError'
    this.input = input
  }
}

export interface LengthParseOptions {
  /** Signed readings (e.g. a position either side of a mark) may be negative; sizes may not. */
  allowNegative?: boolean
}

type LengthUnit = 'in' | 'mm' | 'cm'

const UNIT_ALIASES: Record<string, LengthUnit> = {
  '"': 'in',
  '″': 'in',
  '”': 'in',
  'in': 'in',
  'in.': 'in',
  'inch': 'in',
  'inches': 'in',
  'mm': 'mm',
  'millimetre': 'mm',
  'millimetres': 'mm',
  'millimeter': 'mm',
  'millimeters': 'mm',
  'cm': 'cm',
  'centimetre': 'cm',
  'centimetres': 'cm',
  'centimeter': 'cm',
  'centimeters': 'cm',
}

const INCHES_PER_UNIT: Record<LengthUnit, Fraction> = {
  in: new Fraction(1),
  mm: new Fraction(10, 254),
  cm: new Fraction(100, 254),
}

// Mixed number ("1 3/16", "1-3/16"), plain fraction ("7/16") or decimal ("0.4375", ".4375", "2").
const MIXED = /^(\d+)(?:\s+|\s*-\s*)(\d+)\s*\/\s*(\d+)$/
const FRACTION = /^(\d+)\s*\/\s*(\d+)$/
const DECIMAL = /^(\d+(?:\.\d*)?|\.\d+)$/

function splitUnit(input: string, text: string): { quantity: string, unit: LengthUnit } {
  const match = /^(.*?)\s*(["″”]|[a-z]+\.?)$/i.exec(text)
  if (!match) return { quantity: text, unit: 'in' }
  const written = match[2] ?? ''
  const unit = UNIT_ALIASES[written.toLowerCase()]
  if (unit) return { quantity: match[1] ?? '', unit }
  // A number followed by a word we don't know is a unit problem, not a number problem.
  if (/\d\s*$/.test(match[1] ?? '')) throw new LengthParseError(input, `unknown unit "${written}"; use in, mm or cm`)
  return { quantity: text, unit: 'in' }
}

function parseQuantity(input: string, quantity: string): Fraction {
  const mixed = MIXED.exec(quantity)
  if (mixed) {
    const [, whole = '', numerator = '', denominator = ''] = mixed
    if (BigInt(denominator) === 0n) throw new LengthParseError(input, 'division by zero')
    const part = new Fraction(BigInt(numerator), BigInt(denominator))
    if (part.gte(1)) throw new LengthParseError(input, `the fraction in a mixed number must be less than 1 (${numerator}/${denominator})`)
    return part.add(BigInt(whole))
  }
  const fraction = FRACTION.exec(quantity)
  if (fraction) {
    const [, numerator = '', denominator = ''] = fraction
    if (BigInt(denominator) === 0n) throw new LengthParseError(input, 'division by zero')
    return new Fraction(BigInt(numerator), BigInt(denominator))
  }
  if (DECIMAL.test(quantity)) return new Fraction(quantity)
  throw new LengthParseError(input, LENGTH_HINT)
}

/**
 * Exact value of a typed length, in inches, as a fraction. Inches are assumed when no unit is given.
 * Accepts `7/16`, `1 3/16`, `1-3/16`, `0.4375`, `.4375`, `2.187"`, `2.187 in`, `11.1 mm`, `3 cm`.
 */
export function parseLengthFraction(input: string | number, options: LengthParseOptions = {}): Fraction {
  if (typeof input === 'number') {
    checkLengthNumber(input, options)
    try {
      return new Fraction(input)
    }
    catch {
      // fraction.js cannot turn every double into a ratio (1e308 among them).
      throw new LengthParseError(String(input), 'the number is too large to read as a length')
    }
  }
  const text = input.trim()
  if (text === '') throw new LengthParseError(input, `nothing was typed; ${LENGTH_HINT}`)
  if (text.length > LENGTH_TEXT_MAX_CHARS) throw new LengthParseError(`${text.slice(0, 12)}…`, `at most ${LENGTH_TEXT_MAX_CHARS} characters; ${LENGTH_HINT}`)
  let body = text
  let negative = false
  if (/^[-−]/.test(body)) {
    negative = true
    body = body.slice(1).trim()
  }
  else if (body.startsWith('+')) {
    body = body.slice(1).trim()
  }
  if (negative && !options.allowNegative) throw new LengthParseError(input, 'a length cannot be negative here')
  const { quantity, unit } = splitUnit(input, body)
  const inches = parseQuantity(input, quantity.trim()).mul(INCHES_PER_UNIT[unit])
  return negative ? inches.neg() : inches
}

function checkLengthNumber(input: number, options: LengthParseOptions) {
  if (!Number.isFinite(input)) throw new LengthParseError(String(input), 'not a finite number')
  if (input < 0 && !options.allowNegative) throw new LengthParseError(String(input), 'a length cannot be negative here')
}

/** A typed length in inches (see `parseLengthFraction` for what is accepted). */
export function parseLength(input: string | number, options: LengthParseOptions = {}): number {
  // A number is already inches; going through a fraction could only blur it.
  if (typeof input === 'number') {
    checkLengthNumber(input, options)
    return input
  }
  const inches = parseLengthFraction(input, options).valueOf()
  // Exact fractions of hundreds of digits become Infinity or NaN as numbers; no bench reads those.
  if (!Number.isFinite(inches)) throw new LengthParseError(input, 'the number is too long to read')
  return inches
}

/** Inches as a decimal, three places by default: `1.188`. */
export function formatInches(inches: number, places = 3): string {
  return inches.toFixed(places)
}

/** Millimetres as a decimal, two places by default: `30.16`. */
export function formatMillimetres(inches: number, places = 2): string {
  return inchesToMillimetres(inches).toFixed(places)
}

/**
 * A length as the workshop shows it: decimal inches, the rule fraction, and millimetres beside.
 * `1.188 in (1 3/16 in) · 30.16 mm`; the fraction gets a `≈` when it is rounded to the nearest 1/64.
 */
export function formatLengthLabel(inches: number): string {
  const approx = isWholeSixtyFourth(inches) ? '' : '≈ '
  return `${formatInches(inches)} in (${approx}${formatInchFraction(inches)} in) · ${formatMillimetres(inches)} mm`
}

export interface LengthFieldOptions extends LengthParseOptions {
  /** Reject zero as well as negatives (diameters, lengths of groove). */
  positive?: boolean
  /** Smallest accepted length in inches (a negative one needs `allowNegative`). */
  min?: number
  /** Largest accepted length in inches; `LENGTH_SANITY_LIMIT_IN` when not given. */
  max?: number
}

/**
 * Nothing on a cylinder bench measures anywhere near this: a blank is about 4 3/16 in long and
 * 2.19 in across. A field without a bound of its own still refuses a larger figure as a slip.
 */
export const LENGTH_SANITY_LIMIT_IN = 48

/** A bound as the maker reads it: `6 in (152.4 mm)`. */
function boundLabel(inches: number): string {
  const places = Number.isInteger(inches) ? 0 : Math.abs(inches) < 0.01 ? 4 : 3
  return `${Number(inches.toFixed(places))} in (${Number(inchesToMillimetres(inches).toFixed(2))} mm)`
}

/**
 * A zod field that takes what a person types (or a number) and gives inches.
 * Every issue names the field, so a 400 can point at it.
 */
export function lengthField(name: string, options: LengthFieldOptions = {}) {
  return z
    .union([z.string(), z.number()], {
      error: issue => issue.input === undefined
        ? `${name} is required`
        : `${name} must be a length such as 7/16, 1 3/16, 0.4375 or 11.1 mm`,
    })
    .transform((value, ctx) => {
      try {
        const inches = parseLength(value, options)
        const fail = (message: string) => {
          ctx.addIssue({ code: 'custom', message })
          return z.NEVER
        }
        if (options.positive && inches <= 0) return fail(`${name} must be more than 0 in`)
        const max = options.max ?? LENGTH_SANITY_LIMIT_IN
        const min = options.min ?? (options.allowNegative ? -max : 0)
        if (inches > max) return fail(`${name} must be at most ${boundLabel(max)}: check the figure`)
        if (inches < min) return fail(`${name} must be at least ${boundLabel(min)}: check the figure`)
        return inches
      }
      catch (error) {
        if (!(error instanceof LengthParseError)) throw error
        ctx.addIssue({ code: 'custom', message: `${name}: ${error.message}` })
        return z.NEVER
      }
    })
}
