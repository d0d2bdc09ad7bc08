import { describe, expect, it } from 'vitest'
import { benchHeatFit, heatFitQuerySchema } from '../../shared/utils/benchSchemas'
import { defaultEngineSettings } from '../../shared/utils/engineSettings'
import { formatShippingDay, formatTemperatureStep, heatFitShift, heatRisk } from '../../shared/utils/heat'
import type { UnitPreferences } from '../../shared/utils/units'

/*
 * The heat engine computes in °C; its sentences read in the shop's unit with the other beside.
 * Conversions: t/°F = 1.8 t/°C + 32, and a step of 1 °C is 1.8 °F (NIST SP 811, appendix B.8);
 * 1 in = 25.4 mm exactly (NIST SP 811 B.8). Thresholds are the shop's default settings (caution 27 °C,
 * hold 32 °C, 1 °C stricter per extra day in transit: shop choices, no source).
 */

const fahrenheitShop: UnitPreferences = { temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' }
const celsiusShop: UnitPreferences = { temperature: 'C', length: 'mm', weight: 'kg', locale: 'en-GB' }
// 38 °C = 100.4 °F; 3 days in transit lower the hold threshold by 2 °C (3.6 °F) to 30 °C = 86 °F.
const forecast = { forecastHigh: 38, unit: 'C' as const, daysInTransit: 3 }

describe('heat-risk reasons in the shop\'s temperature unit', () => {
  it('the same forecast reads in °F for a °F shop and in °C for a °C shop, with the same verdict', () => {
    const inF = heatRisk(forecast, defaultEngineSettings, fahrenheitShop)
    const inC = heatRisk(forecast, defaultEngineSettings, celsiusShop)
    expect(inF.level).toBe('hold')
    expect(inC.level).toBe('hold')
    expect(inF.holdAtC).toBe(inC.holdAtC)
    expect(inF.reasons[0]).toBe('Forecast high 100.4 °F (38 °C) is at or above the hold threshold of 86 °F (30 °C), lowered by 3.6 °F (2 °C) for 3 days in transit: hold the parcel until the forecast cools.')
    expect(inC.reasons[0]).toBe('Forecast high 38 °C (100.4 °F) is at or above the hold threshold of 30 °C (86 °F), lowered by 2 °C (3.6 °F) for 3 days in transit: hold the parcel until the forecast cools.')
    // Delivery vans reach about 60 °C = 140 °F (shipping guidance).
    expect(inF.reasons[1]).toContain('about 140 °F (60 °C)')
    expect(inC.reasons[1]).toContain('about 60 °C (140 °F)')
    expect(inF.reasons.join(' ')).not.toMatch(/\d °C \(/)
  })

  it('a forecast typed in °F gives the same sentences as the same high typed in °C', () => {
    const typedF = heatRisk({ ...forecast, forecastHigh: 100.4, unit: 'F' }, defaultEngineSettings, fahrenheitShop)
    expect(typedF.reasons).toEqual(heatRisk(forecast, defaultEngineSettings, fahrenheitShop).reasons)
  })

  it('callers without the shop\'s preferences keep °C first', () => {
    expect(heatRisk({ forecastHigh: 18, unit: 'C', daysInTransit: 1 }).reasons[0]).toBe('Forecast high 18 °C (64.4 °F) is below the caution threshold of 27 °C (80.6 °F).')
  })

  it('a step of temperature converts by the size of a degree alone', () => {
    expect(formatTemperatureStep(7, fahrenheitShop)).toBe('12.6 °F (7 °C)')
    expect(formatTemperatureStep(7, celsiusShop)).toBe('7 °C (12.6 °F)')
  })
})

describe('heat-fit notes in the shop\'s units', () => {
  it('the taper reads in millimetres for a millimetre shop, in inches for an inch shop', () => {
    const unverified = { ...defaultEngineSettings, fit: { ...defaultEngineSettings.fit, taper: { perFootIn: 0.375, unverified: true } } }
    // 3/8 in = 9.525 mm (to two places 9.52 or 9.53, as the binary figure falls).
    expect(heatFitShift({ temperature: 95, unit: 'F' }, unverified, celsiusShop).notes[0]).toMatch(/9\.5[23] mm \(3\/8 in\) per foot/)
    expect(heatFitShift({ temperature: 95, unit: 'F' }, unverified, fahrenheitShop).notes[0]).toMatch(/3\/8 in \(9\.5[23] mm\) per foot/)
  })

  it('a batch near its softening point is warned of in the shop\'s unit', () => {
    const batch = { id: 1, code: 'T-1', formula: 'stearic acid', volumetricExpansionPerK: 750e-6, softeningPointC: 62 }
    const query = heatFitQuerySchema.parse({ temperature: '55', unit: 'C', batchId: '1' })
    // 55 °C is 7 °C (12.6 °F) short of 62 °C = 143.6 °F.
    expect(benchHeatFit(query, defaultEngineSettings, batch, fahrenheitShop).notes[0]).toContain('within 12.6 °F (7 °C) of batch T-1\'s softening point of 143.6 °F (62 °C)')
    expect(benchHeatFit(query, defaultEngineSettings, batch, celsiusShop).notes[0]).toContain('within 7 °C (12.6 °F) of batch T-1\'s softening point of 62 °C (143.6 °F)')
  })
})

describe('a shipping day with its weekday in the shop\'s locale', () => {
  it('7 December 2026 is a Monday (calendar)', () => {
    expect(formatShippingDay('2026-12-07', 'en-GB')).toBe('Mon 7 Dec')
    expect(formatShippingDay('2026-12-07', 'en-US')).toBe('Mon, Dec 7')
  })
})
