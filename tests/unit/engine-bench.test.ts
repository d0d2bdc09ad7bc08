import { describe, expect, it } from 'vitest'
import {
  benchCustomFit,
  benchHeatFit,
  benchHeatRisk,
  benchPlayingTime,
  benchReaming,
  benchShaving,
  customFitBodySchema,
  heatFitQuerySchema,
  heatRiskQuerySchema,
  playingTimeQuerySchema,
  reamingQuerySchema,
  shavingQuerySchema,
} from '../../shared/utils/benchSchemas'
import { defaultEngineSettings } from '../../shared/utils/engineSettings'

const messagesOf = (result: { success: boolean, error?: { issues: { message: string, path: PropertyKey[] }[] } }) =>
  (result.error?.issues ?? []).map(issue => `${issue.path.join('.')}: ${issue.message}`)

describe('playing-time bench', () => {
  it('answers from a query string (cylinder technical notes of university sound archives; arithmetic; NIST 1 in = 25.4 mm)', () => {
    const query = playingTimeQuerySchema.parse({ length: '3.6', tpi: '100', rpm: '160', diameter: '2.19' })
    const answer = benchPlayingTime(query)
    expect(Object.keys(answer).sort()).toEqual(['groovePitchMm', 'minutes', 'rotationHz', 'seconds', 'surfaceSpeedInPerSec'])
    expect(answer.minutes).toBeCloseTo(2.25, 4)
    expect(answer.seconds).toBeCloseTo(135, 2)
    expect(answer.surfaceSpeedInPerSec).toBeCloseTo(18.3, 1)
    expect(answer.rotationHz).toBeCloseTo(2.67, 2)
    expect(answer.groovePitchMm).toBeCloseTo(0.254, 4)
  })

  it('takes fractions and defaults to the standard speed and blank', () => {
    const answer = benchPlayingTime(playingTimeQuerySchema.parse({ length: '3 4/5', tpi: 200 }))
    expect(answer.minutes).toBeCloseTo(4.75, 4)
    expect(answer.surfaceSpeedInPerSec).toBeCloseTo((Math.PI * 2.19 * 160) / 60, 3)
  })

  it('names the field that is wrong', () => {
    expect(messagesOf(playingTimeQuerySchema.safeParse({ length: 'long', tpi: 'x' }))).toEqual([
      'length: length: "long" is not a length: expected inches like 7/16, 1 3/16, 0.4375 or millimetres like 11.1 mm',
      'tpi: tpi must be a number, got "x"',
    ])
    expect(messagesOf(playingTimeQuerySchema.safeParse({ tpi: '100', rpm: '0' }))).toEqual([
      'length: length is required',
      'rpm: rpm must be more than 0',
    ])
  })
})

describe('custom-fit bench', () => {
  it('answers words, seconds, capacity, verdict and words left', () => {
    const body = customFitBodySchema.parse({ script: 'Happy forty-second birthday, Ada!', format: 'two_minute' })
    const answer = benchCustomFit(body)
    const { wordsPerMinute, leadInSeconds, runOutSeconds } = defaultEngineSettings.speech
    expect(answer.words).toBe(5)
    expect(answer.seconds).toBeCloseTo(leadInSeconds + runOutSeconds + (5 * 60) / wordsPerMinute, 1)
    expect(answer.capacitySeconds).toBe(135)
    expect(answer.verdict).toBe('fits')
    expect(answer.wordsLeft).toBe(Math.floor(((135 - leadInSeconds - runOutSeconds) * wordsPerMinute) / 60) - 5)
  })

  it('refuses a long script, an unknown format and a missing script, naming each', () => {
    expect(messagesOf(customFitBodySchema.safeParse({ script: 'x'.repeat(20_001), format: 'eight_minute' }))).toEqual([
      'script: script must be at most 20000 characters',
      'format: format must be two_minute or four_minute',
    ])
    expect(messagesOf(customFitBodySchema.safeParse({ format: 'two_minute' }))).toEqual(['script: script is required'])
  })
})

describe('reaming bench (common practice, no source)', () => {
  it('3/16 in showing with 7/16 in wanted: 4 reamings in one set', () => {
    const answer = benchReaming(reamingQuerySchema.parse({ overhang: '3/16', target: '7/16', perReaming: '1/16', setSize: '4' }))
    expect(answer.reamings).toBe(4)
    expect(answer.sets).toBe(1)
    expect(answer.steps).toEqual([{ afterReamings: 4, overhangIn: 0.4375 }])
    expect(answer.warnings.join(' ')).toMatch(/cannot be undone/)
  })

  it('names a bad set size', () => {
    expect(messagesOf(reamingQuerySchema.safeParse({ overhang: '0', setSize: '2.5' }))).toEqual(['setSize: setSize must be a whole number'])
  })
})

describe('shaving bench', () => {
  it('high 2.200, low 2.194, 45°, min 2.10, 0.003 per surface (common practice, no source; arithmetic)', () => {
    const answer = benchShaving(shavingQuerySchema.parse({ high: '2.200', low: '2.194', wheel: '45', min: '2.10', perSurface: '0.003' }))
    expect(answer.infeedIn).toBeCloseTo(0.003, 5)
    expect(answer.passes).toBe(1)
    expect(answer.diameterAfterIn).toBeCloseTo(2.194, 4)
    expect(answer.surfacesLeft).toBe(Math.floor((2.194 - 2.1) / (2 * 0.003)))
    expect(answer.steps).toEqual([{ pass: 1, diameterIn: 2.194 }])
    expect(answer.warnings).toEqual([])
  })

  it('needs low or depth, and low not above high', () => {
    expect(messagesOf(shavingQuerySchema.safeParse({ high: '2.19' }))).toEqual(['low: low (the smallest diameter read around the blank) or depth is required'])
    expect(messagesOf(shavingQuerySchema.safeParse({ high: '2.19', low: '2.2' }))).toEqual(['low: low must not be more than high'])
  })
})

describe('heat benches', () => {
  it('heat and fit from a query (arithmetic on handbook coefficients)', () => {
    const answer = benchHeatFit(heatFitQuerySchema.parse({ temperature: '95', wax: 'stearic_acid', bore: '1.8' }))
    expect(answer.boreGrowthIn).toBeCloseTo(1.8 * 270e-6 * (20 * 5 / 9), 5)
    expect(answer.taperUnverified).toBe(true)
  })

  it('heat risk from a query', () => {
    const answer = benchHeatRisk(heatRiskQuerySchema.parse({ high: String(defaultEngineSettings.heat.holdHighC), days: '1' }))
    expect(answer.level).toBe('hold')
    expect(messagesOf(heatRiskQuerySchema.safeParse({ high: '30', unit: 'K', days: '1' }))).toEqual(['unit: unit must be C or F'])
  })
})
