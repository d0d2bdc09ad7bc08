import fc from 'fast-check'
import Fraction from 'fraction.js'
import { describe, expect, it } from 'vitest'
import { cylinderFormats } from '../../shared/utils/cylinder'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'
import type { EngineSettings } from '../../shared/utils/engineSettings'
import { CartPricingError, formatMoney } from '../../shared/utils/moneyFormat'
import {
  customMessagePriceComponents,
  priceCart,
  shippingPriceMinor,
  taxOnAmountMinor,
} from '../../shared/utils/money'
import type { CartLineInput } from '../../shared/utils/money'

const prices = defaultEngineSettings.prices

describe('priceCart', () => {
  it('prices blanks by format, recorded cylinders at their own price, and adds shipping and tax', () => {
    const cart = priceCart({
      lines: [
        { kind: 'blank', format: 'two_minute', quantity: 3 },
        { kind: 'recorded', title: 'Invented Quartet – Evening Song', unitPriceMinor: 3450, quantity: 1 },
      ],
      shippingZoneId: 'domestic',
      taxRegionId: 'home_state',
    })
    const region = prices.taxRegions.find(candidate => candidate.id === 'home_state')
    const zone = prices.shippingZones.find(candidate => candidate.id === 'domestic')
    if (!region || !zone) throw new Error('default settings lost a region or zone')
    const blanks = 3 * prices.blankMinor.two_minute
    expect(cart.lines.map(line => line.lineTotalMinor)).toEqual([blanks, 3450])
    expect(cart.subtotalMinor).toBe(blanks + 3450)
    expect(cart.parcels).toBe(1)
    expect(cart.shippingMinor).toBe(zone.firstParcelMinor)
    const lineTax = (amount: number) => Number(new Fraction(amount * region.rateBasisPoints, 10_000).round().n)
    expect(cart.taxMinor).toBe(lineTax(blanks) + lineTax(3450) + (region.taxShipping ? lineTax(zone.firstParcelMinor) : 0))
    expect(cart.totalMinor).toBe(cart.subtotalMinor + cart.shippingMinor + cart.taxMinor)
  })

  it('charges each further parcel at the additional rate', () => {
    const zone = prices.shippingZones[0]
    if (!zone) throw new Error('no zone')
    expect(shippingPriceMinor(zone.id, 3)).toBe(zone.firstParcelMinor + 2 * zone.additionalParcelMinor)
    const cylinders = defaultEngineSettings.packing.cylindersPerParcel + 1
    const cart = priceCart({ lines: [{ kind: 'blank', format: 'four_minute', quantity: cylinders }], shippingZoneId: zone.id, taxRegionId: 'no_tax' })
    expect(cart.parcels).toBe(2)
    expect(cart.taxMinor).toBe(0)
  })

  it('prices a custom message: base, each started 30 s beyond the included length, 4-minute surcharge, rush', () => {
    const custom = prices.customMessage
    const seconds = custom.includedSeconds + 31 // two started blocks of 30 s
    const components = customMessagePriceComponents('four_minute', seconds, true)
    expect(components.reduce((sum, component) => sum + component.amountMinor, 0))
      .toBe(custom.baseMinor + 2 * custom.perExtra30sMinor + custom.fourMinuteSurchargeMinor + custom.rushMinor)
    const plain = customMessagePriceComponents('two_minute', custom.includedSeconds, false)
    expect(plain).toEqual([{ label: 'Custom message', amountMinor: custom.baseMinor }])
    expect(customMessagePriceComponents('two_minute', custom.includedSeconds + 30, false)[1]?.amountMinor).toBe(custom.perExtra30sMinor)
  })

  it('rounds tax half up, exactly', () => {
    expect(taxOnAmountMinor(200, 25)).toBe(1) // 0.5 cent → 1
    expect(taxOnAmountMinor(199, 25)).toBe(0) // 0.4975 cent → 0
    expect(taxOnAmountMinor(Number.MAX_SAFE_INTEGER, 10_000)).toBe(Number.MAX_SAFE_INTEGER)
  })

  it('refuses amounts that are not whole minor units, unknown zones and regions, and bad quantities', () => {
    const base = { shippingZoneId: 'domestic', taxRegionId: 'no_tax' }
    expect(() => priceCart({ ...base, lines: [{ kind: 'recorded', title: 'x', unitPriceMinor: 10.5, quantity: 1 }] })).toThrow(CartPricingError)
    expect(() => priceCart({ ...base, lines: [{ kind: 'blank', format: 'two_minute', quantity: 0 }] })).toThrow(/quantity on line 1/)
    expect(() => priceCart({ ...base, shippingZoneId: 'moon', lines: [] })).toThrow(/unknown shipping zone "moon"/)
    expect(() => priceCart({ ...base, taxRegionId: 'atlantis', lines: [] })).toThrow(/unknown tax region "atlantis"/)
    expect(() => engineSettingsSchema.parse({ prices: { blankMinor: { two_minute: 18.5 } } })).toThrow(/whole minor units/)
  })

  it('never has a sum off by a cent, over 10,000 random carts, and gives only integers', () => {
    const line: fc.Arbitrary<CartLineInput> = fc.oneof(
      fc.record({ kind: fc.constant('blank' as const), format: fc.constantFrom(...cylinderFormats), quantity: fc.integer({ min: 1, max: 50 }) }),
      fc.record({ kind: fc.constant('recorded' as const), title: fc.constant('A recorded title'), unitPriceMinor: fc.integer({ min: 0, max: 500_000 }), quantity: fc.integer({ min: 1, max: 20 }) }),
      fc.record({
        kind: fc.constant('custom_message' as const),
        format: fc.constantFrom(...cylinderFormats),
        spokenSeconds: fc.double({ min: 0, max: 300, noNaN: true }),
        rush: fc.boolean(),
      }),
    )
    const settingsArbitrary = fc.record({
      rateBasisPoints: fc.integer({ min: 0, max: 2_500 }),
      taxShipping: fc.boolean(),
      firstParcelMinor: fc.integer({ min: 0, max: 20_000 }),
      additionalParcelMinor: fc.integer({ min: 0, max: 20_000 }),
      blank: fc.integer({ min: 1, max: 100_000 }),
    }).map((random): EngineSettings => ({
      ...defaultEngineSettings,
      prices: {
        ...defaultEngineSettings.prices,
        blankMinor: { two_minute: random.blank, four_minute: random.blank + 1 },
        shippingZones: [{ id: 'zone', label: 'Zone', firstParcelMinor: random.firstParcelMinor, additionalParcelMinor: random.additionalParcelMinor }],
        taxRegions: [{ id: 'region', label: 'Region', rateBasisPoints: random.rateBasisPoints, taxShipping: random.taxShipping }],
      },
    }))

    fc.assert(fc.property(settingsArbitrary, fc.array(line, { maxLength: 10 }), fc.option(fc.integer({ min: 0, max: 5 }), { nil: undefined }), (settings, lines, parcels) => {
      const cart = priceCart({ lines, shippingZoneId: 'zone', taxRegionId: 'region', parcels }, settings)
      const region = settings.prices.taxRegions[0]
      if (!region) throw new Error('no region')
      // checks gathered into one list, so 10,000 runs stay quick; any entry is a failure
      const problems: string[] = []
      const check = (ok: boolean, what: string) => {
        if (!ok) problems.push(what)
      }
      const amounts = [cart.subtotalMinor, cart.shippingMinor, cart.shippingTaxMinor, cart.taxMinor, cart.totalMinor,
        ...cart.lines.flatMap(priced => [priced.unitPriceMinor, priced.lineTotalMinor, priced.taxMinor, ...priced.components.map(component => component.amountMinor)])]
      for (const amount of amounts) check(Number.isSafeInteger(amount), `not an integer: ${amount}`)
      check(cart.lines.reduce((sum, priced) => sum + priced.lineTotalMinor, 0) === cart.subtotalMinor, 'line totals do not add up to the subtotal')
      check(cart.lines.reduce((sum, priced) => sum + priced.taxMinor, cart.shippingTaxMinor) === cart.taxMinor, 'line taxes do not add up to the tax')
      check(cart.subtotalMinor + cart.shippingMinor + cart.taxMinor === cart.totalMinor, 'total is not subtotal + shipping + tax')
      for (const priced of cart.lines) {
        check(priced.lineTotalMinor === priced.unitPriceMinor * priced.quantity, 'line total is not unit price × quantity')
        check(priced.components.reduce((sum, component) => sum + component.amountMinor, 0) === priced.unitPriceMinor, 'components do not add up to the unit price')
        // half-up rounding of the exact tax, worked out independently with fraction.js
        const exactLineTax = Number(new Fraction(priced.lineTotalMinor * region.rateBasisPoints, 10_000).round().n)
        check(priced.taxMinor === exactLineTax, `line tax ${priced.taxMinor} is not ${exactLineTax}`)
      }
      // the rounded tax stays within half a cent per taxed line of the exact tax on the whole order
      const taxedBase = cart.subtotalMinor + (region.taxShipping ? cart.shippingMinor : 0)
      const exactTax = new Fraction(taxedBase * region.rateBasisPoints, 10_000).valueOf()
      check(Math.abs(cart.taxMinor - exactTax) <= (cart.lines.length + 1) / 2 + 1e-9, 'tax strays from the exact tax')
      expect(problems).toEqual([])
    }), { numRuns: 10_000 })
  })
})

describe('formatMoney', () => {
  it('formats minor units with the currency\'s own number of decimals', () => {
    expect(formatMoney(123_456, 'USD', 'en-US')).toBe('$1,234.56')
    expect(formatMoney(5, 'USD', 'en-US')).toBe('$0.05')
    expect(formatMoney(1_234, 'JPY', 'en-US')).toBe('¥1,234')
    expect(formatMoney(123_456, 'EUR', 'de-DE').replace(/\s/g, ' ')).toBe('1.234,56 €')
  })

  it('refuses fractions of a minor unit', () => {
    expect(() => formatMoney(10.5, 'USD')).toThrow(CartPricingError)
  })
})
