import { z } from 'zod'
import { cylinderFormatTable, standardBlankDimensions, standardCylinderRpm } from './cylinder'
import { lengthBounds } from './bounds'
import { lengthField } from './length'
import { temperatureField, weightField } from './units'

/*
 * The shop's settings for the cylinder engine, stored as JSON under the key `engine`.
 * Units: lengths in inches (fractions may be typed), temperatures as named, weights in grams,
 * money in integer minor units of `prices.currency`. Every key has a default, so
 * `engineSettingsSchema.parse({})` is a complete, working set and a stored partial set is filled in.
 */

// Every figure has an upper bound that no small workshop reaches: past it, the figure is a slip.
const atMost = (name: string, max: number, unit: string) => `${name} must be at most ${max}${unit ? ` ${unit}` : ''}: check the figure`
const positiveNumber = (name: string, max: number, unit = '') => z.number({ error: `${name} must be a number` }).positive(`${name} must be more than 0`).max(max, atMost(name, max, unit))
const nonNegativeNumber = (name: string, max: number, unit = '') => z.number({ error: `${name} must be a number` }).min(0, `${name} cannot be negative`).max(max, atMost(name, max, unit))
/** Up to 1,000,000.00 in the shop's currency: far beyond any cylinder, parcel or tax line. */
const MINOR_UNITS_MAX = 100_000_000
const minorUnits = (name: string) => z.number({ error: `${name} must be a number` }).int(`${name} must be whole minor units (cents)`).min(0, `${name} cannot be negative`).max(MINOR_UNITS_MAX, atMost(name, MINOR_UNITS_MAX, 'minor units'))
// Temperatures and weights may be typed in either unit (`90 °F`, `1 lb 4 oz`); they are stored in the unit their name ends with.
const celsius = (name: string) => temperatureField(name, { stored: 'C', min: -60, max: 80 })
const grams = (name: string) => weightField(name, { max: 50_000 })
const inches = (name: string, max: number) => lengthField(name, { positive: true, max })

/** Longest list of formulas, tubes, boxes, zones or regions the shop keeps. */
const LIST_MAX = 50
const uniqueIds = (rows: readonly { id: string }[]) => new Set(rows.map(row => row.id)).size === rows.length
const code = z.string({ error: 'enter a code' }).trim().min(1, 'enter a code').max(40, 'at most 40 characters').regex(/^[a-z0-9_-]+$/i, 'letters, digits, - and _ only')
const name = z.string({ error: 'enter a name' }).trim().min(1, 'enter a name').max(80, 'at most 80 characters')

const formatSettingsSchema = (recordableLengthIn: number) => z.object({
  recordableLengthIn: lengthField('recordableLengthIn', { positive: true, ...lengthBounds.recordedLengthIn }).default(recordableLengthIn),
})

const speechSettingsSchema = z.object({
  /** About 150 words a minute: from memory. */
  wordsPerMinute: positiveNumber('wordsPerMinute', 400, 'words a minute').default(150),
  /** Silent groove before the first word, and after the last, on every message. */
  leadInSeconds: nonNegativeNumber('leadInSeconds', 60, 's').default(4),
  runOutSeconds: nonNegativeNumber('runOutSeconds', 60, 's').default(4),
  /** A message within this last share of the capacity is "tight". */
  tightMargin: z.number().min(0).max(0.5, 'tightMargin is a share of the capacity, at most 0.5').default(0.1),
})

const reamingSettingsSchema = z.object({
  /** About 1/16 in of seat travel per reaming: common practice, no source. */
  perReamingIn: lengthField('perReamingIn', { positive: true, ...lengthBounds.perReamingIn }).default(1 / 16),
  /** Reamings are done in sets of four, then the fit is checked: common practice, no source. */
  setSize: z.number().int('setSize must be a whole number').min(1).max(20).default(4),
  /** Finished overhang about 7/16 in: common practice, no source. */
  targetOverhangIn: lengthField('targetOverhangIn', { allowNegative: true, ...lengthBounds.overhangIn }).default(7 / 16),
})

const shavingSettingsSchema = z.object({
  /** 45° of the in-feed wheel feeds the cutter 0.003 in: common practice, no source. */
  infeedPer45DegreesIn: lengthField('infeedPer45DegreesIn', { positive: true, ...lengthBounds.radialCutIn }).default(0.003),
  /** Deepest cut per pass about 0.003 in on the radius: collectors' forum practice. */
  maxCutPerPassIn: lengthField('maxCutPerPassIn', { positive: true, ...lengthBounds.radialCutIn }).default(0.003),
  /** The shop's own floor: below it a blank is scrapped rather than shaved again. */
  minimumDiameterIn: lengthField('minimumDiameterIn', { positive: true, ...lengthBounds.diameterIn }).default(2.1),
  /** Radial depth taken off to give one fresh surface. */
  depthPerSurfaceIn: lengthField('depthPerSurfaceIn', { positive: true, ...lengthBounds.radialCutIn }).default(0.003),
})

const waxFormulaSchema = z.object({
  id: code,
  label: name,
  /** Volumetric thermal expansion coefficient, per kelvin. */
  volumetricExpansionPerK: positiveNumber('volumetricExpansionPerK', 0.01, 'per K'),
})

const fitSettingsSchema = z.object({
  /** Fit is judged at about 75 °F: common practice, no source. */
  referenceTemperatureF: temperatureField('referenceTemperatureF', { stored: 'F', min: 32, max: 120 }).default(75),
  /** Bore used when none is given: outside diameter less two walls of the standard blank. */
  boreDiameterIn: lengthField('boreDiameterIn', { positive: true, ...lengthBounds.boreIn })
    .default(standardBlankDimensions.outsideDiameterIn - 2 * standardBlankDimensions.wallIn),
  taper: z.object({
    /** Change of diameter per foot of length. About 3/8 in per foot: from memory, UNVERIFIED. */
    perFootIn: lengthField('taper.perFootIn', { positive: true, ...lengthBounds.taperPerFootIn }).default(3 / 8),
    /** Stays true until the shop has measured its own mandrel; shown beside every result that uses it. */
    unverified: z.boolean().default(true),
  }).prefault({}),
  /** Engineering handbook tables (volumetric coefficients; linear ≈ a third). */
  waxFormulas: z.array(waxFormulaSchema).min(1).max(LIST_MAX, `at most ${LIST_MAX} entries`).refine(uniqueIds, 'wax formula ids must be unique').default([
    { id: 'stearic_acid', label: 'Stearic acid', volumetricExpansionPerK: 810e-6 },
    { id: 'paraffin', label: 'Paraffin', volumetricExpansionPerK: 590e-6 },
  ]),
})

const heatSettingsSchema = z.object({
  /** Forecast high (°C) at the destination from which a parcel is shipped only with care. A shop choice. */
  cautionHighC: celsius('cautionHighC').default(27),
  /** Forecast high (°C) from which a parcel is held back. A shop choice. */
  holdHighC: celsius('holdHighC').default(32),
  /** Both thresholds drop by this much for every day in transit beyond the first. */
  stricterPerTransitDayC: temperatureField('stricterPerTransitDayC', { stored: 'C', min: 0, max: 20, difference: true }).default(1),
}).refine(heat => heat.holdHighC >= heat.cautionHighC, { message: 'holdHighC must not be below cautionHighC', path: ['holdHighC'] })

const dimensionsSchema = z.object({
  lengthIn: inches('lengthIn', 120),
  widthIn: inches('widthIn', 120),
  heightIn: inches('heightIn', 120),
})

const tubeSchema = z.object({
  id: code,
  label: name,
  insideDiameterIn: inches('insideDiameterIn', 12),
  insideLengthIn: inches('insideLengthIn', 24),
  outsideDiameterIn: inches('outsideDiameterIn', 12),
  outsideLengthIn: inches('outsideLengthIn', 24),
  weightG: grams('weightG'),
})

const boxSchema = z.object({
  id: code,
  label: name,
  inside: dimensionsSchema,
  /** Board thickness; the outside is the inside plus two walls each way. */
  wallIn: lengthField('wallIn', { max: 2 }),
  weightG: grams('weightG'),
})

const box = (id: string, lengthIn: number, widthIn: number, heightIn: number, weightG: number) => ({
  id,
  label: `${lengthIn} × ${widthIn} × ${heightIn} in`,
  inside: { lengthIn, widthIn, heightIn },
  wallIn: 0.2,
  weightG,
})

const packingSettingsSchema = z.object({
  /** At least 2 in on every side: carrier packing guidance. */
  cushioningIn: z.number().min(2, 'cushioningIn must be at least 2 in (carrier packing guidance)').max(12, atMost('cushioningIn', 12, 'in')).default(2),
  /** Double-box fragile items: carrier packing guidance. */
  doubleBoxFragile: z.boolean().default(true),
  /** Cubic inches per pound for dimensional weight (139 is the usual US carrier figure; set your carrier's). */
  dimensionalDivisorIn3PerLb: positiveNumber('dimensionalDivisorIn3PerLb', 1000, 'in³ per lb').default(139),
  /** A cylinder as it leaves the bench; an estimate, weigh your own. */
  cylinderWeightG: weightField('cylinderWeightG', { max: 5000 }).default(70),
  /** Cushioning and filler per parcel. */
  fillerWeightG: weightField('fillerWeightG', { max: 20_000 }).default(150),
  /** Most cylinders one parcel takes; also how shipping is counted. */
  cylindersPerParcel: z.number().int().min(1).max(48).default(6),
  tubes: z.array(tubeSchema).min(1).max(LIST_MAX, `at most ${LIST_MAX} entries`).refine(uniqueIds, 'tube ids must be unique').default([
    { id: 'tube-standard', label: 'Padded tube for a standard cylinder', insideDiameterIn: 2.375, insideLengthIn: 4.5, outsideDiameterIn: 2.75, outsideLengthIn: 4.875, weightG: 35 },
  ]),
  boxes: z.array(boxSchema).min(1).max(LIST_MAX, `at most ${LIST_MAX} entries`).refine(uniqueIds, 'box ids must be unique').default([
    box('box-4x4x6', 6, 4, 4, 70),
    box('box-6x6x6', 6, 6, 6, 110),
    box('box-8x6x6', 8, 6, 6, 130),
    box('box-8x8x8', 8, 8, 8, 200),
    box('box-10x8x6', 10, 8, 6, 190),
    box('box-10x10x10', 10, 10, 10, 310),
    box('box-12x10x10', 12, 10, 10, 360),
    box('box-12x12x12', 12, 12, 12, 450),
    box('box-14x14x12', 14, 14, 12, 560),
    box('box-16x16x14', 16, 16, 14, 720),
    box('box-18x18x16', 18, 18, 16, 900),
  ]),
})

const shippingZoneSchema = z.object({
  id: code,
  label: name,
  firstParcelMinor: minorUnits('firstParcelMinor'),
  additionalParcelMinor: minorUnits('additionalParcelMinor'),
})

const taxRegionSchema = z.object({
  id: code,
  label: name,
  /** 825 = 8.25 %. */
  rateBasisPoints: z.number().int('rateBasisPoints must be whole basis points').min(0).max(10_000),
  taxShipping: z.boolean(),
})

/** ISO 3166-1 alpha-2 country code ("US", "CA"); typed in any case. */
const countryCode = z.string({ error: 'enter a country code' }).trim().toUpperCase().regex(/^[A-Z]{2}$/, 'a two-letter ISO 3166-1 country code such as US')
/** A region within the country (ISO 3166-2 subdivision part, "TX"); empty = the whole country. */
const regionCode = z.preprocess(value => (typeof value === 'string' && value.trim() === '' ? undefined : value), z.string().trim().toUpperCase().max(10, 'at most 10 characters').regex(/^[A-Z0-9]+$/, 'letters and digits only, such as TX').optional())
const countryZoneSchema = z.object({ country: countryCode, region: regionCode, zone: code })
const taxRuleSchema = z.object({ country: countryCode, region: regionCode, taxRegion: code })

const priceSettingsSchema = z.object({
  /** ISO 4217 code; amounts below are in its minor unit. */
  currency: z.string().regex(/^[A-Z]{3}$/, 'currency must be an ISO 4217 code such as USD').default('USD'),
  blankMinor: z.object({
    two_minute: minorUnits('blankMinor.two_minute').default(1800),
    four_minute: minorUnits('blankMinor.four_minute').default(2400),
  }).prefault({}),
  customMessage: z.object({
    baseMinor: minorUnits('customMessage.baseMinor').default(6500),
    /** Spoken seconds the base price covers. */
    includedSeconds: nonNegativeNumber('customMessage.includedSeconds', 600, 's').default(60),
    /** For each started 30 s beyond the included length. */
    perExtra30sMinor: minorUnits('customMessage.perExtra30sMinor').default(800),
    fourMinuteSurchargeMinor: minorUnits('customMessage.fourMinuteSurchargeMinor').default(1500),
    rushMinor: minorUnits('customMessage.rushMinor').default(2500),
  }).prefault({}),
  shippingZones: z.array(shippingZoneSchema).min(1).max(LIST_MAX, `at most ${LIST_MAX} entries`).refine(uniqueIds, 'shipping zone ids must be unique').default([
    { id: 'domestic', label: 'Domestic', firstParcelMinor: 1200, additionalParcelMinor: 900 },
    { id: 'north_america', label: 'Canada and Mexico', firstParcelMinor: 2800, additionalParcelMinor: 2200 },
    { id: 'international', label: 'Rest of the world', firstParcelMinor: 4500, additionalParcelMinor: 3800 },
  ]),
  taxRegions: z.array(taxRegionSchema).min(1).max(LIST_MAX, `at most ${LIST_MAX} entries`).refine(uniqueIds, 'tax region ids must be unique').default([
    { id: 'no_tax', label: 'No sales tax collected', rateBasisPoints: 0, taxShipping: false },
    { id: 'home_state', label: 'Home state', rateBasisPoints: 825, taxShipping: true },
  ]),
  /**
   * The zone a shipping address falls in, by country (and region, where one is given); the first
   * matching row wins, a row with a region before one without. Addresses matching no row ship as `defaultZone`.
   */
  countryZones: z.array(countryZoneSchema).max(LIST_MAX, `at most ${LIST_MAX} entries`).default([
    { country: 'US', zone: 'domestic' },
    { country: 'CA', zone: 'north_america' },
    { country: 'MX', zone: 'north_america' },
  ]),
  defaultZone: code.default('international'),
  /** The tax region of a shipping address, matched like `countryZones`; the shop's home state is a demo choice. */
  taxRules: z.array(taxRuleSchema).max(LIST_MAX, `at most ${LIST_MAX} entries`).default([
    { country: 'US', region: 'TX', taxRegion: 'home_state' },
  ]),
  defaultTaxRegion: code.default('no_tax'),
}).superRefine((prices, ctx) => {
  // Every zone and tax region named by a rule must be one the shop keeps.
  const zones = new Set(prices.shippingZones.map(zone => zone.id))
  const regions = new Set(prices.taxRegions.map(region => region.id))
  prices.countryZones.forEach((rule, index) => {
    if (!zones.has(rule.zone)) ctx.addIssue({ code: 'custom', path: ['countryZones', index, 'zone'], message: `no shipping zone "${rule.zone}"` })
  })
  if (!zones.has(prices.defaultZone)) ctx.addIssue({ code: 'custom', path: ['defaultZone'], message: `no shipping zone "${prices.defaultZone}"` })
  prices.taxRules.forEach((rule, index) => {
    if (!regions.has(rule.taxRegion)) ctx.addIssue({ code: 'custom', path: ['taxRules', index, 'taxRegion'], message: `no tax region "${rule.taxRegion}"` })
  })
  if (!regions.has(prices.defaultTaxRegion)) ctx.addIssue({ code: 'custom', path: ['defaultTaxRegion'], message: `no tax region "${prices.defaultTaxRegion}"` })
})

const productionSettingsSchema = z.object({
  /** Days from payment to a made-to-order cylinder's due date on its ticket. A shop choice. */
  leadTimeDays: z.number({ error: 'leadTimeDays must be a number' }).int('leadTimeDays must be whole days').min(1, 'leadTimeDays must be at least 1').max(365, 'leadTimeDays is at most 365').default(10),
})

const wholeDays = (field: string, min: number, max: number) => z.number({ error: `${field} must be a number` }).int(`${field} must be whole days`).min(min, `${field} must be at least ${min}`).max(max, `${field} is at most ${max}`)

const dispatchSettingsSchema = z.object({
  /**
   * Weekdays the shop hands parcels to the carrier. Early in the week keeps a parcel out of a depot over
   * the weekend (common shipping practice, no source); a shop choice.
   */
  shipOn: z.object({
    monday: z.boolean().default(true),
    tuesday: z.boolean().default(true),
    wednesday: z.boolean().default(true),
    thursday: z.boolean().default(false),
    friday: z.boolean().default(false),
    saturday: z.boolean().default(false),
    sunday: z.boolean().default(false),
  }).prefault({}).refine(days => Object.values(days).some(Boolean), { message: 'ship on at least one weekday', path: ['monday'] }),
  /** Days after a heat hold before the order is looked at again. A shop choice. */
  heatRecheckDays: wholeDays('heatRecheckDays', 1, 30).default(2),
  /** Carriers offered on the ship form (free text is allowed too). */
  carriers: z.array(z.object({ id: code, label: name })).min(1).max(LIST_MAX, `at most ${LIST_MAX} entries`).refine(uniqueIds, 'carrier ids must be unique').default([
    { id: 'post', label: 'Postal service' },
    { id: 'courier', label: 'Parcel courier' },
  ]),
  /** Days after delivery during which a breakage may be reported. A shop choice. */
  claimWindowDays: wholeDays('claimWindowDays', 1, 365).default(14),
})

const customSettingsSchema = z.object({
  /** Re-cuts of a personal message a customer may ask for at no charge. A shop choice. */
  freeRecuts: z.number({ error: 'freeRecuts must be a number' }).int('freeRecuts must be a whole number').min(0, 'freeRecuts cannot be negative').max(10, 'freeRecuts is at most 10').default(1),
  /** Price of a re-cut after the free ones. */
  paidRecutMinor: minorUnits('custom.paidRecutMinor').default(2500),
  /** Days a proof may wait for an answer before the one reminder mail. */
  proofReminderDays: wholeDays('proofReminderDays', 1, 60).default(5),
  /** Days from payment to the due date of a rushed message (the usual lead time is under Production). */
  rushLeadTimeDays: wholeDays('rushLeadTimeDays', 1, 365).default(4),
})

export const engineSettingsSchema = z.object({
  formats: z.object({
    two_minute: formatSettingsSchema(cylinderFormatTable.two_minute.defaultRecordableLengthIn).prefault({}),
    four_minute: formatSettingsSchema(cylinderFormatTable.four_minute.defaultRecordableLengthIn).prefault({}),
  }).prefault({}),
  standardRpm: positiveNumber('standardRpm', 400, 'rpm').default(standardCylinderRpm),
  speech: speechSettingsSchema.prefault({}),
  reaming: reamingSettingsSchema.prefault({}),
  shaving: shavingSettingsSchema.prefault({}),
  fit: fitSettingsSchema.prefault({}),
  heat: heatSettingsSchema.prefault({}),
  packing: packingSettingsSchema.prefault({}),
  prices: priceSettingsSchema.prefault({}),
  production: productionSettingsSchema.prefault({}),
  dispatch: dispatchSettingsSchema.prefault({}),
  custom: customSettingsSchema.prefault({}),
})

export type EngineSettings = z.output<typeof engineSettingsSchema>
export type EngineSettingsInput = z.input<typeof engineSettingsSchema>
export type PackingBox = EngineSettings['packing']['boxes'][number]
export type PackingTube = EngineSettings['packing']['tubes'][number]

export const defaultEngineSettings: EngineSettings = engineSettingsSchema.parse({})
