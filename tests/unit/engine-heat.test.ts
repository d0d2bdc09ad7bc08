import { describe, expect, it } from 'vitest'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'
import {
  boreGrowthIn,
  heatFitShift,
  heatRisk,
  linearExpansionFromVolumetric,
  nextEarlyWeekShippingDay,
  taperTravelIn,
} from '../../shared/utils/heat'
import { celsiusToFahrenheit, fahrenheitToCelsius } from '../../shared/utils/units'

describe('thermal growth of the bore', () => {
  it('a 10 °C rise with α = 250×10⁻⁶/K widens a 1.8 in bore by 0.0045 in (arithmetic on handbook coefficients)', () => {
    expect(boreGrowthIn(1.8, 250e-6, 10)).toBeCloseTo(0.0045, 12)
  })

  it('volumetric 810×10⁻⁶/K gives linear 270×10⁻⁶/K (engineering handbook tables; linear ≈ a third)', () => {
    expect(linearExpansionFromVolumetric(810e-6)).toBeCloseTo(270e-6, 15)
  })

  it('the settings carry stearic acid 810×10⁻⁶/K and paraffin 590×10⁻⁶/K (engineering handbook tables)', () => {
    const waxes = Object.fromEntries(defaultEngineSettings.fit.waxFormulas.map(wax => [wax.id, wax.volumetricExpansionPerK]))
    expect(waxes).toEqual({ stearic_acid: 810e-6, paraffin: 590e-6 })
  })

  it('travel along a taper is the growth ÷ the taper per inch on diameter', () => {
    // 3/8 in per foot is 1/32 in per inch, so 0.0045 in of growth is 0.144 in of travel
    expect(taperTravelIn(0.0045, 3 / 8)).toBeCloseTo(0.0045 * 32, 12)
  })

  it('converts °F and °C', () => {
    expect(fahrenheitToCelsius(212)).toBeCloseTo(100, 12)
    expect(celsiusToFahrenheit(-40)).toBeCloseTo(-40, 12)
  })

  it('at about 95 °F a blank sits further along the mandrel than at the 75 °F reference (common practice, no source)', () => {
    const shift = heatFitShift({ temperature: 95, unit: 'F', waxId: 'stearic_acid', boreDiameterIn: 1.8 })
    expect(shift.referenceTemperatureF).toBe(75)
    expect(shift.deltaK).toBeCloseTo(20 * 5 / 9, 12)
    const expectedGrowth = 1.8 * (810e-6 / 3) * (20 * 5 / 9)
    expect(shift.boreGrowthIn).toBeCloseTo(expectedGrowth, 12)
    expect(shift.extraTravelIn).toBeCloseTo(expectedGrowth / (3 / 8 / 12), 12)
    expect(shift.extraTravelIn).toBeGreaterThan(0)
    // the taper is from memory and unverified: it says so
    expect(shift.taperUnverified).toBe(true)
    expect(shift.notes.join(' ')).toMatch(/unverified/)
  })

  it('the same temperature given in °C gives the same shift', () => {
    const inF = heatFitShift({ temperature: 95, unit: 'F' })
    const inC = heatFitShift({ temperature: fahrenheitToCelsius(95), unit: 'C' })
    expect(inC.extraTravelIn).toBeCloseTo(inF.extraTravelIn, 12)
  })

  it('refuses an unknown wax formula', () => {
    expect(() => heatFitShift({ temperature: 80, unit: 'F', waxId: 'beeswax' })).toThrow(/no wax formula "beeswax"/)
  })
})

describe('heatRisk (thresholds are shop settings; delivery vans reach about 60 °C, shipping guidance)', () => {
  const { cautionHighC, holdHighC, stricterPerTransitDayC } = defaultEngineSettings.heat

  it('is ok below the caution threshold, caution from it, hold from the hold threshold (1 day)', () => {
    expect(heatRisk({ forecastHigh: cautionHighC - 0.1, unit: 'C', daysInTransit: 1 }).level).toBe('ok')
    expect(heatRisk({ forecastHigh: cautionHighC, unit: 'C', daysInTransit: 1 }).level).toBe('caution')
    expect(heatRisk({ forecastHigh: holdHighC - 0.1, unit: 'C', daysInTransit: 1 }).level).toBe('caution')
    const hold = heatRisk({ forecastHigh: holdHighC, unit: 'C', daysInTransit: 1 })
    expect(hold.level).toBe('hold')
    expect(hold.reasons.join(' ')).toMatch(/hold threshold.*60 °C/s)
  })

  it('reads a forecast in °F', () => {
    expect(heatRisk({ forecastHigh: celsiusToFahrenheit(holdHighC) + 1, unit: 'F', daysInTransit: 1 }).level).toBe('hold')
    expect(heatRisk({ forecastHigh: 70, unit: 'F', daysInTransit: 1 }).level).toBe('ok')
  })

  it('gets stricter with every day in transit beyond the first', () => {
    const days = 4
    const risk = heatRisk({ forecastHigh: cautionHighC - 1, unit: 'C', daysInTransit: days })
    expect(risk.cautionAtC).toBe(cautionHighC - stricterPerTransitDayC * (days - 1))
    expect(risk.holdAtC).toBe(holdHighC - stricterPerTransitDayC * (days - 1))
    expect(risk.level).toBe('caution')
    expect(heatRisk({ forecastHigh: cautionHighC - 1, unit: 'C', daysInTransit: 1 }).level).toBe('ok')
  })

  it('follows the thresholds set by the shop', () => {
    const settings = engineSettingsSchema.parse({ heat: { cautionHighC: 20, holdHighC: 25 } })
    expect(heatRisk({ forecastHigh: 22, unit: 'C', daysInTransit: 1 }, settings).level).toBe('caution')
    expect(() => engineSettingsSchema.parse({ heat: { cautionHighC: 30, holdHighC: 25 } })).toThrow(/holdHighC/)
  })
})

describe('nextEarlyWeekShippingDay (shipping guidance: ship early in the week)', () => {
  const weekday = (isoDate: string) => new Date(`${isoDate}T00:00:00Z`).getUTCDay()

  it('from a Thursday is the next Monday', () => {
    const thursday = '2025-07-03'
    expect(weekday(thursday)).toBe(4)
    const day = nextEarlyWeekShippingDay(thursday)
    expect(weekday(day)).toBe(1)
    expect(day).toBe('2025-07-07')
  })

  it('takes a Date and reads its UTC calendar day', () => {
    expect(nextEarlyWeekShippingDay(new Date(Date.UTC(2025, 6, 5, 15)))).toBe('2025-07-07')
  })

  it('on a Monday or Tuesday is that day', () => {
    expect(nextEarlyWeekShippingDay('2025-07-07')).toBe('2025-07-07')
    expect(nextEarlyWeekShippingDay('2025-07-08')).toBe('2025-07-08')
  })

  it('skips a Tuesday when the parcel would not arrive by Friday', () => {
    expect(nextEarlyWeekShippingDay('2025-07-08', { daysInTransit: 4 })).toBe('2025-07-14')
    expect(nextEarlyWeekShippingDay('2025-07-08', { daysInTransit: 3 })).toBe('2025-07-08')
  })

  it('refuses a malformed date', () => {
    expect(() => nextEarlyWeekShippingDay('07/03/2025')).toThrow(/expected a date like/)
  })
})
