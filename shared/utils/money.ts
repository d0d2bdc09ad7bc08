import type { CylinderFormat } from './cylinder'
import { cylinderFormatTable } from './cylinder'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'
import { parcelsForCylinders } from './packing'
// Formatting and the minor-unit check live apart, free of the engine's settings schemas, for the shop's pages.
import { assertMinorUnits, CartPricingError } from './moneyFormat'

/*
 * Money is integer minor units (cents) of `settings.prices.currency` everywhere; every amount in and
 * out is checked to be a safe integer. Tax is worked out per line, rounded half up to the cent, and
 * shipping is taxed as a line of its own where the region taxes shipping; the order's tax is the sum
 * of those line taxes. So, always and exactly: Σ line totals = subtotal, Σ line taxes = tax, and
 * total = subtotal + shipping + tax.
 */

function assertQuantity(value: number, what: string): number {
  if (!Number.isSafeInteger(value) || value < 1) throw new CartPricingError(`${what} must be a whole number of 1 or more, got ${value}`)
  return value
}

const BASIS_POINTS = 10_000n

/** amount × rate, rounded half up to the minor unit; exact (BigInt), for amounts of 0 or more. */
export function taxOnAmountMinor(amountMinor: number, rateBasisPoints: number): number {
  assertMinorUnits(amountMinor, 'taxable amount')
  assertMinorUnits(rateBasisPoints, 'tax rate (basis points)')
  if (amountMinor < 0 || rateBasisPoints < 0) throw new CartPricingError('tax is worked out on amounts and rates of 0 or more')
  const scaled = BigInt(amountMinor) * BigInt(rateBasisPoints)
  return Number((scaled + BASIS_POINTS / 2n) / BASIS_POINTS)
}

export interface PriceComponent {
  label: string
  amountMinor: number
}

/**
 * A custom message: the base price, each started 30 s of speech beyond the included length,
 * the 4-minute surcharge and the rush fee. `spokenSeconds` is the speech alone (no lead-in or run-out).
 */
export function customMessagePriceComponents(
  format: CylinderFormat,
  spokenSeconds: number,
  rush: boolean,
  settings: EngineSettings = defaultEngineSettings,
): PriceComponent[] {
  if (!(spokenSeconds >= 0)) throw new CartPricingError(`message length must be 0 s or more, got ${spokenSeconds}`)
  const prices = settings.prices.customMessage
  const components: PriceComponent[] = [{ label: 'Custom message', amountMinor: prices.baseMinor }]
  const beyond = spokenSeconds - prices.includedSeconds
  const extraBlocks = beyond > 1e-9 ? Math.ceil(beyond / 30 - 1e-9) : 0
  if (extraBlocks > 0) components.push({ label: `${extraBlocks} × 30 s beyond ${prices.includedSeconds} s`, amountMinor: extraBlocks * prices.perExtra30sMinor })
  if (format === 'four_minute') components.push({ label: '4-minute format', amountMinor: prices.fourMinuteSurchargeMinor })
  if (rush) components.push({ label: 'Rush', amountMinor: prices.rushMinor })
  for (const component of components) assertMinorUnits(component.amountMinor, component.label)
  return components
}

export type CartLineInput
  = | { kind: 'blank', format: CylinderFormat, quantity: number }
    | { kind: 'recorded', title: string, unitPriceMinor: number, quantity: number }
    | { kind: 'custom_message', format: CylinderFormat, spokenSeconds: number, rush?: boolean, quantity?: number }

export interface CartInput {
  lines: CartLineInput[]
  shippingZoneId: string
  taxRegionId: string
  /** Parcels to ship; by default as many as the cylinders need (`packing.cylindersPerParcel` each). */
  parcels?: number | undefined
}

export interface PricedCartLine {
  kind: CartLineInput['kind']
  description: string
  quantity: number
  unitPriceMinor: number
  lineTotalMinor: number
  taxMinor: number
  components: PriceComponent[]
}

export interface PricedCart {
  currency: string
  lines: PricedCartLine[]
  parcels: number
  subtotalMinor: number
  shippingMinor: number
  /** Tax on shipping (0 where the region does not tax it); included in `taxMinor`. */
  shippingTaxMinor: number
  taxMinor: number
  totalMinor: number
}

function unitPrice(line: CartLineInput, settings: EngineSettings): { description: string, components: PriceComponent[] } {
  switch (line.kind) {
    case 'blank':
      return {
        description: `Blank, ${cylinderFormatTable[line.format].label}`,
        components: [{ label: 'Blank', amountMinor: settings.prices.blankMinor[line.format] }],
      }
    case 'recorded':
      if (line.unitPriceMinor < 0) throw new CartPricingError(`price of "${line.title}" cannot be negative`)
      return { description: line.title, components: [{ label: line.title, amountMinor: line.unitPriceMinor }] }
    case 'custom_message':
      return {
        description: `Custom message, ${cylinderFormatTable[line.format].label}${line.rush ? ', rush' : ''}`,
        components: customMessagePriceComponents(line.format, line.spokenSeconds, line.rush ?? false, settings),
      }
  }
}

/** Shipping for a zone: the first parcel, then each further parcel at the additional rate. */
export function shippingPriceMinor(zoneId: string, parcels: number, settings: EngineSettings = defaultEngineSettings): number {
  const zone = settings.prices.shippingZones.find(candidate => candidate.id === zoneId)
  if (!zone) throw new CartPricingError(`unknown shipping zone "${zoneId}"`)
  if (!Number.isSafeInteger(parcels) || parcels < 0) throw new CartPricingError(`parcels must be a whole number of 0 or more, got ${parcels}`)
  if (parcels === 0) return 0
  return assertMinorUnits(zone.firstParcelMinor + (parcels - 1) * zone.additionalParcelMinor, 'shipping')
}

/** Prices every line from the settings (never from what a browser sent) and adds it all up. */
export function priceCart(cart: CartInput, settings: EngineSettings = defaultEngineSettings): PricedCart {
  const region = settings.prices.taxRegions.find(candidate => candidate.id === cart.taxRegionId)
  if (!region) throw new CartPricingError(`unknown tax region "${cart.taxRegionId}"`)

  let cylinders = 0
  const lines = cart.lines.map((line, index): PricedCartLine => {
    const quantity = assertQuantity(line.kind === 'custom_message' ? line.quantity ?? 1 : line.quantity, `quantity on line ${index + 1}`)
    const { description, components } = unitPrice(line, settings)
    const unitPriceMinor = assertMinorUnits(components.reduce((sum, component) => sum + component.amountMinor, 0), `unit price on line ${index + 1}`)
    const lineTotalMinor = assertMinorUnits(unitPriceMinor * quantity, `total on line ${index + 1}`)
    cylinders += quantity
    return { kind: line.kind, description, quantity, unitPriceMinor, lineTotalMinor, taxMinor: taxOnAmountMinor(lineTotalMinor, region.rateBasisPoints), components }
  })

  const parcels = cart.parcels ?? parcelsForCylinders(cylinders, settings)
  const subtotalMinor = assertMinorUnits(lines.reduce((sum, line) => sum + line.lineTotalMinor, 0), 'subtotal')
  const shippingMinor = shippingPriceMinor(cart.shippingZoneId, parcels, settings)
  const shippingTaxMinor = region.taxShipping ? taxOnAmountMinor(shippingMinor, region.rateBasisPoints) : 0
  const taxMinor = assertMinorUnits(lines.reduce((sum, line) => sum + line.taxMinor, shippingTaxMinor), 'tax')
  const totalMinor = assertMinorUnits(subtotalMinor + shippingMinor + taxMinor, 'total')
  return { currency: settings.prices.currency, lines, parcels, subtotalMinor, shippingMinor, shippingTaxMinor, taxMinor, totalMinor }
}

/** Digits after the decimal point in the currency's minor unit (2 for USD, 0 for JPY). */
