import { describe, expect, it } from 'vitest'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'

describe('engineSettingsSchema', () => {
  it('fills every default from an empty object', () => {
    expect(engineSettingsSchema.parse({})).toEqual(defaultEngineSettings)
  })

  it('carries the documented defaults with their sources', () => {
    const settings = defaultEngineSettings
    expect(settings.speech.wordsPerMinute).toBe(150) // from memory
    expect(settings.speech.tightMargin).toBe(0.1)
    expect(settings.reaming.perReamingIn).toBe(1 / 16) // common practice, no source
    expect(settings.reaming.setSize).toBe(4) // common practice, no source
    expect(settings.fit.referenceTemperatureF).toBe(75) // common practice, no source
    expect(settings.shaving.infeedPer45DegreesIn).toBe(0.003) // common practice, no source
    expect(settings.shaving.maxCutPerPassIn).toBe(0.003) // collectors' forum practice
    expect(settings.fit.taper).toEqual({ perFootIn: 3 / 8, unverified: true }) // from memory, UNVERIFIED
    expect(settings.packing.cushioningIn).toBeGreaterThanOrEqual(2) // carrier packing guidance
    expect(settings.standardRpm).toBe(160)
  })

  it('fills in around a stored partial set and takes typed fractions', () => {
    const settings = engineSettingsSchema.parse({ reaming: { perReamingIn: '1/32' }, fit: { taper: { perFootIn: '5/8', unverified: false } } })
    expect(settings.reaming.perReamingIn).toBe(1 / 32)
    expect(settings.reaming.setSize).toBe(4)
    expect(settings.fit.taper).toEqual({ perFootIn: 5 / 8, unverified: false })
    expect(settings.fit.waxFormulas).toEqual(defaultEngineSettings.fit.waxFormulas)
  })

  it('survives a round trip through JSON, as stored under the key engine', () => {
    expect(engineSettingsSchema.parse(JSON.parse(JSON.stringify(defaultEngineSettings)))).toEqual(defaultEngineSettings)
  })

  it('names the setting that is wrong', () => {
    const result = engineSettingsSchema.safeParse({ reaming: { perReamingIn: 'a lot' }, prices: { currency: 'dollars' } })
    const messages = (result.error?.issues ?? []).map(issue => `${issue.path.join('.')}: ${issue.message}`)
    expect(messages).toEqual([
      'reaming.perReamingIn: perReamingIn: "a lot" is not a length: expected inches like 7/16, 1 3/16, 0.4375 or millimetres like 11.1 mm',
      'prices.currency: currency must be an ISO 4217 code such as USD',
    ])
  })

  it('refuses duplicate ids in a list', () => {
    const zone = { id: 'same', label: 'Zone', firstParcelMinor: 100, additionalParcelMinor: 50 }
    expect(engineSettingsSchema.safeParse({ prices: { shippingZones: [zone, zone] } }).success).toBe(false)
  })
})
