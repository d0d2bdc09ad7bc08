import { z } from 'zod'
import { lengthBounds } from './bounds'
import { cylinderFormats, groovePitchMm, playingTimeMinutes, rotationFrequencyHz, standardBlankDimensions, surfaceSpeedInPerSec } from './cylinder'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'
import { celsiusHeatWords, formatTemperatureStep, heatFitShift, heatRisk } from './heat'
import type { HeatWordPrefs } from './heat'
import { fahrenheitToCelsius, formatTemperature, temperatureField } from './units'
import { idField } from './ids'
import { lengthField } from './length'
import { messageFitForFormat } from './messageFit'
import { reamingPlan } from './reaming'
import { shavingPlan } from './shaving'

/*
 * Inputs of the bench calculators (query strings or JSON bodies) and the answers the routes return.
 * Lengths accept what a maker types (7/16, 1 3/16, 11.1 mm); every issue names its field.
 */

export interface NumberInputFieldOptions {
  min?: number
  max?: number
  /** Strictly more than 0. */
  positive?: boolean
  integer?: boolean
}

/** A number from a query string or a body; issues name the field. */
export function numberInputField(name: string, options: NumberInputFieldOptions = {}) {
  return z
    .union([z.number(), z.string()], {
      error: issue => issue.input === undefined ? `${name} is required` : `${name} must be a number`,
    })
    .transform((raw, ctx) => {
      const value = typeof raw === 'number' ? raw : raw.trim() === '' ? Number.NaN : Number(raw.trim())
      const fail = (message: string) => {
        ctx.addIssue({ code: 'custom', message })
        return z.NEVER
      }
      if (!Number.isFinite(value)) return fail(`${name} must be a number, got "${raw}"`)
      if (options.integer && !Number.isInteger(value)) return fail(`${name} must be a whole number`)
      if (options.positive && value <= 0) return fail(`${name} must be more than 0`)
      if (options.min !== undefined && value < options.min) return fail(`${name} must be at least ${options.min}`)
      if (options.max !== undefined && value > options.max) return fail(`${name} must be at most ${options.max}`)
      return value
    })
}

const roundTo = (value: number, places: number) => Number(value.toFixed(places))

/** Longest custom-message script the fit meter and its route accept. */
export const CUSTOM_SCRIPT_MAX_CHARS = 20_000

const rpmField = numberInputField('rpm', { positive: true, max: 400 })

export const playingTimeQuerySchema = z.object({
  length: lengthField('length', { positive: true, ...lengthBounds.recordedLengthIn }),
  tpi: numberInputField('tpi', { positive: true, max: 1000 }),
  rpm: rpmField.optional(),
  diameter: lengthField('diameter', { positive: true, ...lengthBounds.diameterIn }).optional(),
})
export type PlayingTimeQuery = z.output<typeof playingTimeQuerySchema>

/** Playing time and groove figures; rpm defaults to the shop's standard, diameter to the standard blank. */
export function benchPlayingTime(query: PlayingTimeQuery, settings: EngineSettings = defaultEngineSettings) {
  const rpm = query.rpm ?? settings.standardRpm
  const minutes = playingTimeMinutes(query.length, query.tpi, rpm)
  return {
    minutes: roundTo(minutes, 4),
    seconds: roundTo(minutes * 60, 2),
    surfaceSpeedInPerSec: roundTo(surfaceSpeedInPerSec(query.diameter ?? standardBlankDimensions.outsideDiameterIn, rpm), 3),
    rotationHz: roundTo(rotationFrequencyHz(rpm), 4),
    groovePitchMm: roundTo(groovePitchMm(query.tpi), 4),
  }
}

export const customFitBodySchema = z.object({
  script: z
    .string({ error: issue => issue.input === undefined ? 'script is required' : 'script must be text' })
    .max(CUSTOM_SCRIPT_MAX_CHARS, `script must be at most ${CUSTOM_SCRIPT_MAX_CHARS} characters`),
  format: z.enum(cylinderFormats, { error: 'format must be two_minute or four_minute' }),
  rpm: rpmField.optional(),
})
export type CustomFitBody = z.output<typeof customFitBodySchema>

/** `seconds` is what the message takes on the record: lead-in + speech + run-out. */
export function benchCustomFit(body: CustomFitBody, settings: EngineSettings = defaultEngineSettings) {
  const fit = messageFitForFormat(body.script, body.format, settings, body.rpm ?? settings.standardRpm)
  return {
    words: fit.words,
    seconds: roundTo(fit.seconds, 1),
    capacitySeconds: roundTo(fit.capacitySeconds, 1),
    verdict: fit.verdict,
    wordsLeft: fit.wordsLeft,
  }
}

export const reamingQuerySchema = z.object({
  overhang: lengthField('overhang', { allowNegative: true, ...lengthBounds.overhangIn }),
  target: lengthField('target', { allowNegative: true, ...lengthBounds.overhangIn }).optional(),
  perReaming: lengthField('perReaming', { positive: true, ...lengthBounds.perReamingIn }).optional(),
  setSize: numberInputField('setSize', { integer: true, min: 1, max: 20 }).optional(),
  /** Temperature of the blank when read, °F. */
  temperatureF: temperatureField('temperatureF', { stored: 'F', min: -40, max: 160 }).optional(),
})
export type ReamingQuery = z.output<typeof reamingQuerySchema>

export function benchReaming(query: ReamingQuery, settings: EngineSettings = defaultEngineSettings) {
  const plan = reamingPlan({
    overhangIn: query.overhang,
    targetIn: query.target,
    perReamingIn: query.perReaming,
    setSize: query.setSize,
    benchTemperatureF: query.temperatureF,
  }, settings)
  return {
    reamings: plan.reamings,
    sets: plan.sets,
    steps: plan.steps.map(step => ({ afterReamings: step.afterReamings, overhangIn: roundTo(step.overhangIn, 4) })),
    warnings: plan.warnings,
  }
}

export const shavingQuerySchema = z.object({
  high: lengthField('high', { positive: true, ...lengthBounds.diameterIn }),
  low: lengthField('low', { positive: true, ...lengthBounds.diameterIn }).optional(),
  /** Radial depth to clean up, instead of low. */
  depth: lengthField('depth', lengthBounds.radialCutIn).optional(),
  wheel: numberInputField('wheel', { positive: true, max: 360 }).optional(),
  min: lengthField('min', { positive: true, ...lengthBounds.diameterIn }).optional(),
  perSurface: lengthField('perSurface', { positive: true, ...lengthBounds.radialCutIn }).optional(),
}).superRefine((query, ctx) => {
  if (query.low === undefined && query.depth === undefined) {
    ctx.addIssue({ code: 'custom', path: ['low'], message: 'low (the smallest diameter read around the blank) or depth is required' })
  }
  if (query.low !== undefined && query.low > query.high) {
    ctx.addIssue({ code: 'custom', path: ['low'], message: 'low must not be more than high' })
  }
})
export type ShavingQuery = z.output<typeof shavingQuerySchema>

export function benchShaving(query: ShavingQuery, settings: EngineSettings = defaultEngineSettings) {
  const plan = shavingPlan({
    highDiameterIn: query.high,
    lowDiameterIn: query.low,
    depthToCleanUpIn: query.depth,
    wheelDegrees: query.wheel,
    minimumDiameterIn: query.min,
    perSurfaceIn: query.perSurface,
  }, settings)
  return {
    infeedIn: roundTo(plan.infeedIn, 5),
    passes: plan.passes,
    diameterAfterIn: roundTo(plan.diameterAfterIn, 4),
    surfacesLeft: plan.surfacesLeft,
    steps: plan.steps.map(step => ({ pass: step.pass, diameterIn: roundTo(step.diameterIn, 4) })),
    warnings: plan.warnings,
  }
}

const temperatureUnitField = z.enum(['C', 'F'], { error: 'unit must be C or F' })

/**
 * The wax comes from one of the shop's formulas (`wax`, the first when neither is given) or from one
 * of the workshop's own poured batches (`batchId`), whose measured figures are then used.
 */
export const heatFitQuerySchema = z.object({
  temperature: numberInputField('temperature', { min: -40, max: 200 }),
  unit: temperatureUnitField.default('F'),
  wax: z.string().min(1, 'wax must name a wax formula').optional(),
  batchId: idField('batchId', 'choose a wax batch').optional(),
  bore: lengthField('bore', { positive: true, ...lengthBounds.boreIn }).optional(),
}).superRefine((query, ctx) => {
  if (query.wax !== undefined && query.batchId !== undefined) {
    ctx.addIssue({ code: 'custom', path: ['batchId'], message: 'choose a wax formula or a wax batch, not both' })
  }
})
export type HeatFitQuery = z.output<typeof heatFitQuerySchema>

/** A poured batch's own figures, as the heat-and-fit calculator uses them. */
export interface HeatFitBatch {
  id: number
  code: string
  formula: string
  volumetricExpansionPerK: number
  softeningPointC: number | null
}

/**
 * How close to its softening point a batch may be warmed before the calculator warns: a shop's
 * margin of safety, not a measured figure (common practice, no source). Wax loses its shape well
 * before it melts, and the tested fit assumes the blank is rigid.
 */
export const SOFTENING_MARGIN_C = 10

/** `words`: the shop's units for the notes (°C and inches when left out); the figures stay in °F, K and inches. */
export function benchHeatFit(query: HeatFitQuery, settings: EngineSettings = defaultEngineSettings, batch?: HeatFitBatch, words: HeatWordPrefs = celsiusHeatWords) {
  const shift = heatFitShift({
    temperature: query.temperature,
    unit: query.unit,
    waxId: batch ? undefined : query.wax,
    volumetricExpansionPerK: batch?.volumetricExpansionPerK,
    boreDiameterIn: query.bore,
  }, settings, words)
  const notes = [...shift.notes]
  let softening: { softeningPointC: number, marginC: number } | null = null
  if (batch && batch.softeningPointC !== null) {
    const marginC = batch.softeningPointC - fahrenheitToCelsius(shift.temperatureF)
    softening = { softeningPointC: batch.softeningPointC, marginC: roundTo(marginC, 1) }
    if (marginC <= 0) {
      notes.unshift(`At this temperature batch ${batch.code} is at or past its softening point of ${formatTemperature(batch.softeningPointC, words)}: the blank will lose its shape, and no fit holds.`)
    }
    else if (marginC <= SOFTENING_MARGIN_C) {
      notes.unshift(`This is within ${formatTemperatureStep(roundTo(marginC, 1), words)} of batch ${batch.code}'s softening point of ${formatTemperature(batch.softeningPointC, words)}: the wax may sag or take the mandrel's mark; keep it cooler.`)
    }
  }
  return {
    referenceTemperatureF: shift.referenceTemperatureF,
    deltaK: roundTo(shift.deltaK, 2),
    volumetricExpansionPerK: shift.volumetricExpansionPerK,
    linearExpansionPerK: shift.linearExpansionPerK,
    boreGrowthIn: roundTo(shift.boreGrowthIn, 5),
    extraTravelIn: roundTo(shift.extraTravelIn, 4),
    taperUnverified: shift.taperUnverified,
    /** Where the expansion coefficient came from. */
    wax: batch
      ? { source: 'batch' as const, batchId: batch.id, code: batch.code, formula: batch.formula }
      : { source: 'formula' as const, id: query.wax ?? settings.fit.waxFormulas[0]?.id ?? null },
    softening,
    notes,
  }
}

export const heatRiskQuerySchema = z.object({
  high: numberInputField('high', { min: -60, max: 140 }),
  unit: temperatureUnitField.default('C'),
  days: numberInputField('days', { integer: true, min: 0, max: 30 }),
})
export type HeatRiskQuery = z.output<typeof heatRiskQuerySchema>

export function benchHeatRisk(query: HeatRiskQuery, settings: EngineSettings = defaultEngineSettings, words: HeatWordPrefs = celsiusHeatWords) {
  return heatRisk({ forecastHigh: query.high, unit: query.unit, daysInTransit: query.days }, settings, words)
}
