import { describe, expect, it } from 'vitest'
import { temperatureInCelsius } from '../../shared/utils/heat'
import {
  defaultUnitPreferences, formatLength, formatTemperature, formatWeight, fromCelsius, gramsToPoundsOunces,
  temperatureField, toGrams, toInches, unitPreferencesSchema, weightField,
} from '../../shared/utils/units'
import { countOf, formatDay } from '../../shared/utils/wording'

describe('unit conversions', () => {
  it('converts temperatures both ways', () => {
    // Fixed points: water freezes at 0 °C = 32 °F and boils at 100 °C = 212 °F; −40 is the same in both
    // (NIST SP 811, appendix B.8: t/°F = 1.8 t/°C + 32).
    expect(fromCelsius(0, 'F')).toBe(32)
    expect(fromCelsius(100, 'F')).toBe(212)
    expect(fromCelsius(-40, 'F')).toBe(-40)
    expect(temperatureInCelsius(212, 'F')).toBe(100)
    // The maker who typed 92 meaning °F: 33.3 °C, not 92 °C.
    expect(temperatureInCelsius(92, 'F')).toBeCloseTo(33.333, 3)
    expect(fromCelsius(25, 'C')).toBe(25)
  })

  it('converts lengths and weights by the exact definitions', () => {
    // 1 in = 25.4 mm and 1 lb = 0.453 592 37 kg exactly (international yard and pound, 1959; NIST SP 811 B.8).
    expect(toInches(25.4, 'mm')).toBe(1)
    expect(toInches(2.1875, 'in')).toBe(2.1875)
    expect(toGrams(1, 'lb')).toBeCloseTo(453.59237, 9)
    expect(toGrams(1.25, 'kg')).toBe(1250)
    // 1 lb = 16 oz: 1 oz = 28.349 523 125 g (NIST SP 811 B.8).
    expect(gramsToPoundsOunces(28.349523125)).toEqual({ pounds: 0, ounces: 1 })
    expect(gramsToPoundsOunces(453.59237)).toEqual({ pounds: 1, ounces: 0 })
    // 15.99 oz rounds to 16.0 oz and is carried to the next pound, not shown as "0 lb 16 oz".
    expect(gramsToPoundsOunces(453.3)).toEqual({ pounds: 1, ounces: 0 })
  })
})

describe('formatting in the shop\'s units', () => {
  const metric = { ...defaultUnitPreferences, temperature: 'C' as const, length: 'mm' as const, weight: 'kg' as const }
  const imperial = { ...defaultUnitPreferences, temperature: 'F' as const, length: 'in' as const, weight: 'lb' as const, locale: 'en-US' as const }

  it('puts the shop\'s unit first and the other beside it', () => {
    expect(formatTemperature(30, metric)).toBe('30 °C (86 °F)')
    expect(formatTemperature(30, imperial)).toBe('86 °F (30 °C)')
    expect(formatTemperature(30, imperial, { beside: false })).toBe('86 °F')
    // A standard cylinder's outside diameter, 2 3/16 in (common practice, no source): 55.5625 mm.
    expect(formatLength(2.1875, imperial)).toBe('2 3/16 in (55.56 mm)')
    expect(formatLength(2.1875, metric)).toBe('55.56 mm (2 3/16 in)')
    expect(formatLength(1.19, imperial)).toBe('≈ 1 3/16 in (30.23 mm)')
    expect(formatWeight(575, metric)).toBe('575 g (1 lb 4.3 oz)')
    expect(formatWeight(1250, imperial)).toBe('2 lb 12.1 oz (1.25 kg)')
  })

  it('refuses an unknown unit, naming the field', () => {
    const parsed = unitPreferencesSchema.safeParse({ temperature: 'K' })
    expect(parsed.success).toBe(false)
    expect(parsed.error?.issues[0]?.path).toEqual(['temperature'])
    expect(unitPreferencesSchema.parse({})).toEqual({ temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' })
  })
})

describe('counted words and dates', () => {
  it('uses the plural rules, never "(s)"', () => {
    expect(countOf(1, 'ticket')).toBe('1 ticket')
    expect(countOf(0, 'ticket')).toBe('0 tickets')
    expect(countOf(2, 'box', 'boxes')).toBe('2 boxes')
    expect(countOf(1200, 'order')).toBe('1,200 orders')
  })

  it('shows a calendar day as that day in every time zone, in the shop\'s date order', () => {
    expect(formatDay('2026-12-03')).toBe('3 Dec 2026')
    expect(formatDay('2026-12-03', 'en-US')).toBe('Dec 3, 2026')
    expect(formatDay('2026-01-01', 'en-GB', 'long')).toBe('1 January 2026')
  })
})

describe('figures typed with their unit', () => {
  const parse = (schema: { safeParse: (value: unknown) => { success: boolean, data?: unknown, error?: { issues: { message: string }[] } } }, value: unknown) => {
    const result = schema.safeParse(value)
    return result.success ? result.data : `refused: ${result.error?.issues[0]?.message}`
  }

  it('takes a temperature in either unit and stores it in the field\'s own', () => {
    const holdHighC = temperatureField('holdHighC', { stored: 'C', min: -60, max: 80 })
    expect(parse(holdHighC, 32)).toBe(32)
    expect(parse(holdHighC, '32')).toBe(32)
    // 89.6 °F = 32 °C (NIST SP 811 B.8: t/°C = (t/°F − 32)/1.8).
    expect(parse(holdHighC, '89.6 °F')).toBe(32)
    expect(parse(holdHighC, '89.6F')).toBe(32)
    expect(parse(holdHighC, '−5,5 °C')).toBe(-5.5)
    // 92 meant as °F but stored as °C is refused with both units named, not taken as a heatwave.
    expect(parse(temperatureField('softeningPointC', { stored: 'C', min: 0, max: 80 }), '192')).toBe('refused: softeningPointC must be at most 80 °C (176 °F): check the figure and its unit')
    const referenceF = temperatureField('referenceTemperatureF', { stored: 'F', min: 32, max: 120 })
    expect(parse(referenceF, '23.9 C')).toBeCloseTo(75.02, 2)
    expect(parse(referenceF, 'warm')).toMatch(/^refused: referenceTemperatureF must be a temperature/)
    expect(parse(referenceF, '75 K')).toMatch(/^refused: referenceTemperatureF must be a temperature/)
  })

  it('takes a weight in grams, kilograms, pounds and ounces and stores grams', () => {
    const weighed = weightField('weighedG', { max: 30_000 })
    expect(parse(weighed, 575)).toBe(575)
    expect(parse(weighed, '575 g')).toBe(575)
    expect(parse(weighed, '1,2 kg')).toBe(1200)
    // 1 lb 4 oz = 20 oz × 28.349 523 125 g = 566.990 g (NIST SP 811 B.8).
    expect(parse(weighed, '1 lb 4 oz')).toBeCloseTo(566.990, 3)
    expect(parse(weighed, '20oz')).toBeCloseTo(566.990, 3)
    expect(parse(weighed, '2 stone')).toMatch(/^refused: weighedG must be a weight/)
    expect(parse(weighed, '-3 g')).toMatch(/^refused: weighedG must be a weight/)
    expect(parse(weighed, '100 kg')).toMatch(/^refused: weighedG must be at most 30000 g \(66 lb 2\.2 oz\)/)
  })
})
