import { describe, expect, it } from 'vitest'
import { countryCodeFor, countryCodes, placeForAddress, regionCodeFor } from '../../shared/utils/addressPlace'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'

const prices = defaultEngineSettings.prices

describe('countries and regions of an address', () => {
  it('keeps the 249 officially assigned ISO 3166-1 alpha-2 codes (ISO 3166-1, 2020 list), no reserved or withdrawn ones', () => {
    expect(countryCodes).toHaveLength(249)
    expect(new Set(countryCodes).size).toBe(249)
    for (const code of ['US', 'CA', 'MX', 'DE', 'GB', 'JP', 'AQ']) expect(countryCodes).toContain(code)
    for (const code of ['UK', 'EU', 'SU', 'YU', 'XK', 'ZZ']) expect(countryCodes).not.toContain(code)
  })

  it('reads a code in any case or an English name; anything else is no country', () => {
    expect(countryCodeFor('us')).toBe('US')
    expect(countryCodeFor(' United States ')).toBe('US')
    expect(countryCodeFor('germany')).toBe('DE')
    expect(countryCodeFor('Utopia')).toBeNull()
    expect(countryCodeFor('UK')).toBeNull()
  })

  it('a US state by name or code is the same region (ISO 3166-2:US)', () => {
    expect(regionCodeFor('US', 'Texas')).toBe('TX')
    expect(regionCodeFor('US', 'tx')).toBe('TX')
    expect(regionCodeFor('US', 'New York')).toBe('NY')
    expect(regionCodeFor('DE', 'BE')).toBe('BE')
  })
})

describe('zone and tax from the address (the shop\'s default figures)', () => {
  it('home state: domestic and the home-state tax; elsewhere in the country: domestic, no tax', () => {
    expect(placeForAddress({ country: 'US', region: 'TX' }, prices)).toMatchObject({ zone: 'domestic', taxRegion: 'home_state', rateBasisPoints: 825 })
    expect(placeForAddress({ country: 'US', region: 'OR' }, prices)).toMatchObject({ zone: 'domestic', taxRegion: 'no_tax', rateBasisPoints: 0 })
  })

  it('neighbours and the rest of the world never get the domestic rate or the home-state tax', () => {
    expect(placeForAddress({ country: 'CA', region: 'TX' }, prices)).toMatchObject({ zone: 'north_america', taxRegion: 'no_tax' })
    expect(placeForAddress({ country: 'MX' }, prices)).toMatchObject({ zone: 'north_america' })
    expect(placeForAddress({ country: 'DE', region: 'TX' }, prices)).toMatchObject({ zone: 'international', taxRegion: 'no_tax', zoneLabel: 'Rest of the world' })
  })

  it('a rule with a region wins over the country-wide one, whatever their order', () => {
    const custom = engineSettingsSchema.parse({ prices: { countryZones: [{ country: 'US', zone: 'domestic' }, { country: 'US', region: 'HI', zone: 'international' }] } }).prices
    expect(placeForAddress({ country: 'US', region: 'Hawaii' }, custom).zone).toBe('international')
    expect(placeForAddress({ country: 'US', region: 'OR' }, custom).zone).toBe('domestic')
  })

  it('before the country is chosen, the shop\'s home country is assumed, without a region\'s tax', () => {
    expect(placeForAddress({}, prices)).toMatchObject({ country: null, zone: 'domestic', taxRegion: 'no_tax' })
  })
})
