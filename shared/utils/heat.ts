import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'
import { celsiusToFahrenheit, fahrenheitToCelsius, formatLength, formatTemperature, otherTemperature } from './unitFormat'
import type { UnitPreferences } from './unitFormat'

export type TemperatureUnit = 'C' | 'F'

/** Delivery-van interiors can reach about 60 °C (shipping guidance). */
export const PARCEL_INTERIOR_PEAK_C = 60

/**
 * How the engine's sentences read their figures: temperatures and lengths in the shop's units
 * (Shop settings) with the other beside, numbers in its locale. The figures themselves stay in °C and
 * inches; callers without the shop's preferences get °C and inches.
 */
export type HeatWordPrefs = Pick<UnitPreferences, 'temperature' | 'length' | 'locale'>
export const celsiusHeatWords: HeatWordPrefs = { temperature: 'C', length: 'in', locale: 'en-GB' }

/**
 * A difference of temperature (a step, not a reading) in the shop's unit with the other beside:
 * `2 °C (3.6 °F)` or `3.6 °F (2 °C)`; a step of 1 °C is a step of 1.8 °F (NIST SP 811 B.8).
 */
export function formatTemperatureStep(stepC: number, prefs: Pick<UnitPreferences, 'temperature' | 'locale'> = celsiusHeatWords): string {
  const inUnit = (unit: TemperatureUnit) => `${new Intl.NumberFormat(prefs.locale, { maximumFractionDigits: 1 }).format(unit === 'C' ? stepC : stepC * 1.8)} °${unit}`
  return `${inUnit(prefs.temperature)} (${inUnit(otherTemperature(prefs.temperature))})`
}

export function temperatureInCelsius(value: number, unit: TemperatureUnit): number {
  return unit === 'C' ? value : fahrenheitToCelsius(value)
}

/** For an isotropic solid the linear coefficient is about a third of the volumetric one. */
export function linearExpansionFromVolumetric(volumetricPerK: number): number {
  return volumetricPerK / 3
}

/** Growth of a bore's diameter: Δd = d × α(linear) × ΔT. */
export function boreGrowthIn(boreDiameterIn: number, linearPerK: number, deltaK: number): number {
  return boreDiameterIn * linearPerK * deltaK
}

/**
 * How much further a tapered bore slides along a tapered mandrel when it widens by `diameterChangeIn`:
 * the taper is the change of diameter per foot, so per inch it is taperPerFoot ÷ 12.
 */
export function taperTravelIn(diameterChangeIn: number, taperPerFootIn: number): number {
  if (!(taperPerFootIn > 0)) throw new RangeError(`taper must be more than 0 in per foot, got ${taperPerFootIn}`)
  return diameterChangeIn / (taperPerFootIn / 12)
}

export interface HeatFitInput {
  /** Temperature of the blank now. */
  temperature: number
  unit: TemperatureUnit
  /** A wax formula from the settings; ignored when a coefficient is given. */
  waxId?: string | undefined
  volumetricExpansionPerK?: number | undefined
  boreDiameterIn?: number | undefined
}

export interface HeatFitShift {
  referenceTemperatureF: number
  temperatureF: number
  /** Temperature now minus the reference, in kelvin. */
  deltaK: number
  volumetricExpansionPerK: number
  linearExpansionPerK: number
  boreDiameterIn: number
  boreGrowthIn: number
  /** Positive: the blank sits further along the mandrel than at the reference temperature. */
  extraTravelIn: number
  taperPerFootIn: number
  taperUnverified: boolean
  notes: string[]
}

/** How far a blank at another temperature sits from where it sat when its fit was judged. */
export function heatFitShift(input: HeatFitInput, settings: EngineSettings = defaultEngineSettings, words: HeatWordPrefs = celsiusHeatWords): HeatFitShift {
  const { referenceTemperatureF, taper, waxFormulas } = settings.fit
  let volumetricExpansionPerK = input.volumetricExpansionPerK
  if (volumetricExpansionPerK === undefined) {
    const formula = input.waxId === undefined ? waxFormulas[0] : waxFormulas.find(wax => wax.id === input.waxId)
    if (!formula) throw new RangeError(`no wax formula "${input.waxId}" in the settings`)
    volumetricExpansionPerK = formula.volumetricExpansionPerK
  }
  const boreDiameterIn = input.boreDiameterIn ?? settings.fit.boreDiameterIn
  const temperatureF = input.unit === 'F' ? input.temperature : celsiusToFahrenheit(input.temperature)
  const deltaK = ((temperatureF - referenceTemperatureF) * 5) / 9
  const linearExpansionPerK = linearExpansionFromVolumetric(volumetricExpansionPerK)
  const growthIn = boreGrowthIn(boreDiameterIn, linearExpansionPerK, deltaK)
  const notes: string[] = []
  if (taper.unverified) notes.push(`The taper, ${formatLength(taper.perFootIn, words)} per foot, is from memory and unverified: measure your mandrel and set it.`)
  notes.push('The mandrel is taken as not growing; steel expands far less than wax.')
  return {
    referenceTemperatureF,
    temperatureF,
    deltaK,
    volumetricExpansionPerK,
    linearExpansionPerK,
    boreDiameterIn,
    boreGrowthIn: growthIn,
    extraTravelIn: taperTravelIn(growthIn, taper.perFootIn),
    taperPerFootIn: taper.perFootIn,
    taperUnverified: taper.unverified,
    notes,
  }
}

export type HeatRiskLevel = 'ok' | 'caution' | 'hold'

export interface HeatRiskInput {
  forecastHigh: number
  unit: TemperatureUnit
  daysInTransit: number
}

export interface HeatRisk {
  level: HeatRiskLevel
  forecastHighC: number
  /** Thresholds after adjusting for the days in transit. */
  cautionAtC: number
  holdAtC: number
  reasons: string[]
}

/**
 * Heat risk of a parcel from the forecast high at the destination and the days in transit.
 * Rule: both thresholds (settings) drop by `stricterPerTransitDayC` for every day in transit beyond the
 * first, since every day is another afternoon in a van; at or above the hold threshold the parcel waits,
 * at or above the caution threshold it goes with heat cautions early in the week. The computation is in
 * °C; the reasons read in the shop's temperature unit (`words`, °C when left out) with the other beside.
 */
export function heatRisk(input: HeatRiskInput, settings: EngineSettings = defaultEngineSettings, words: Pick<HeatWordPrefs, 'temperature' | 'locale'> = celsiusHeatWords): HeatRisk {
  if (!Number.isFinite(input.forecastHigh)) throw new RangeError('the forecast high must be a number')
  if (!(input.daysInTransit >= 0)) throw new RangeError(`days in transit cannot be negative, got ${input.daysInTransit}`)
  const { cautionHighC, holdHighC, stricterPerTransitDayC } = settings.heat
  const extraDays = Math.max(0, Math.ceil(input.daysInTransit) - 1)
  const cautionAtC = cautionHighC - stricterPerTransitDayC * extraDays
  const holdAtC = holdHighC - stricterPerTransitDayC * extraDays
  const forecastHighC = temperatureInCelsius(input.forecastHigh, input.unit)
  const level: HeatRiskLevel = forecastHighC >= holdAtC ? 'hold' : forecastHighC >= cautionAtC ? 'caution' : 'ok'

  const temperature = (celsius: number) => formatTemperature(Math.round(celsius * 10) / 10, words)
  const reasons: string[] = []
  const transit = extraDays > 0
    ? `, lowered by ${formatTemperatureStep(stricterPerTransitDayC * extraDays, words)} for ${input.daysInTransit} days in transit`
    : ''
  const high = `Forecast high ${temperature(forecastHighC)}`
  if (level === 'hold') reasons.push(`${high} is at or above the hold threshold of ${temperature(holdAtC)}${transit}: hold the parcel until the forecast cools.`)
  else if (level === 'caution') reasons.push(`${high} is at or above the caution threshold of ${temperature(cautionAtC)}${transit}: ship early in the week with heat cautions on the slip.`)
  else reasons.push(`${high} is below the caution threshold of ${temperature(cautionAtC)}${transit}.`)
  if (level !== 'ok') reasons.push(`By shipping guidance, delivery-van interiors can reach about ${temperature(PARCEL_INTERIOR_PEAK_C)}, well past the point where wax softens.`)
  return { level, forecastHighC, cautionAtC, holdAtC, reasons }
}

const MONDAY = 1
const TUESDAY = 2
const FRIDAY = 5
const DAY_MS = 86_400_000

function utcMidnight(from: Date | string): number {
  if (typeof from === 'string') {
    const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(from)
    if (!match) throw new RangeError(`expected a date like 2025-07-03, got "${from}"`)
    return Date.UTC(Number(match[1]), Number(match[2]) - 1, Number(match[3]))
  }
  if (Number.isNaN(from.getTime())) throw new RangeError('invalid date')
  return Date.UTC(from.getUTCFullYear(), from.getUTCMonth(), from.getUTCDate())
}

/** Weekday names as the shop's settings spell them, by JavaScript's day number (0 = Sunday). */
export const shippingWeekdayNames = ['sunday', 'monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday'] as const
export type ShippingWeekdayName = typeof shippingWeekdayNames[number]

/** The day numbers (0 = Sunday … 6 = Saturday) of the weekdays a `{ monday: true, … }` record allows. */
export function shippingWeekdays(shipOn: Partial<Record<ShippingWeekdayName, boolean>>): number[] {
  return shippingWeekdayNames.flatMap((name, day) => (shipOn[name] ? [day] : []))
}

/**
 * The first day on or after `from` that is one of `allowedWeekdays` (0 = Sunday … 6 = Saturday) and
 * from which a parcel `daysInTransit` days on the road still arrives by Friday, as `YYYY-MM-DD`.
 * Shipping early in the week keeps a parcel from sitting in a depot or van over a weekend (common
 * shipping practice, no source). When no allowed day within two weeks arrives by Friday (a long
 * transit, or a shop that ships only at the weekend), the first of the allowed day earliest in the week
 * (Monday first, Sunday last) loses least. Calendar days are read in UTC: pass the shop's local date as
 * a `YYYY-MM-DD` string to avoid a time-zone shift.
 */
export function nextShippingDay(from: Date | string, allowedWeekdays: readonly number[], options: { daysInTransit?: number } = {}): string {
  const allowed = new Set(allowedWeekdays.filter(day => Number.isInteger(day) && day >= 0 && day <= 6))
  if (allowed.size === 0) throw new RangeError('ship on at least one weekday')
  const start = utcMidnight(from)
  const transit = Math.max(0, Math.ceil(options.daysInTransit ?? 0))
  let fallback: { day: number, rank: number } | undefined
  for (let offset = 0; offset < 14; offset++) {
    const day = start + offset * DAY_MS
    const weekday = new Date(day).getUTCDay()
    if (!allowed.has(weekday)) continue
    // Monday 1 … Friday 5, Saturday 6, Sunday 7: the place of the day in a working week.
    const rank = weekday === 0 ? 7 : weekday
    if (rank + transit <= FRIDAY) return new Date(day).toISOString().slice(0, 10)
    if (!fallback || rank < fallback.rank) fallback = { day, rank }
  }
  return new Date(fallback!.day).toISOString().slice(0, 10)
}

/**
 * A shipping day (`YYYY-MM-DD`) with its weekday, the way a packer plans the week, in the shop's locale:
 * `Mon 7 Dec` (en-GB) or `Mon, Dec 7` (en-US). Read in UTC so no time zone moves the day.
 */
export function formatShippingDay(isoDay: string, locale = 'en-GB'): string {
  return new Intl.DateTimeFormat(locale, { weekday: 'short', day: 'numeric', month: 'short', timeZone: 'UTC' }).format(new Date(utcMidnight(isoDay) + DAY_MS / 2))
}

/** A calendar date `days` after `from` (a `YYYY-MM-DD` string or a Date read in UTC), as `YYYY-MM-DD`. */
export function addCalendarDays(from: Date | string, days: number): string {
  return new Date(utcMidnight(from) + Math.round(days) * DAY_MS).toISOString().slice(0, 10)
}

/**
 * The first Monday or Tuesday on or after `from` (so a Monday gives itself), as `YYYY-MM-DD`, with
 * `daysInTransit` a Tuesday is skipped when the parcel would not arrive by Friday; past a working week
 * of transit, the first Monday. `nextShippingDay` with Monday and Tuesday allowed.
 */
export function nextEarlyWeekShippingDay(from: Date | string, options: { daysInTransit?: number } = {}): string {
  return nextShippingDay(from, [MONDAY, TUESDAY], options)
}
