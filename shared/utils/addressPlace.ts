import type { EngineSettings } from './engineSettings'

/*
 * Where a parcel goes decides its shipping zone and its sales tax: the server works both out from the
 * shipping address (country, and region where a rule names one), never from the customer's choice.
 * Countries are ISO 3166-1 alpha-2 codes; their names come from the browser's or Node's Intl data.
 */

/** The officially assigned ISO 3166-1 alpha-2 codes (249). */
export const countryCodes = (
  'AD AE AF AG AI AL AM AO AQ AR AS AT AU AW AX AZ BA BB BD BE BF BG BH BI BJ BL BM BN BO BQ BR BS BT BV BW BY BZ '
  + 'CA CC CD CF CG CH CI CK CL CM CN CO CR CU CV CW CX CY CZ DE DJ DK DM DO DZ EC EE EG EH ER ES ET FI FJ FK FM FO FR '
  + 'GA GB GD GE GF GG GH GI GL GM GN GP GQ GR GS GT GU GW GY HK HM HN HR HT HU ID IE IL IM IN IO IQ IR IS IT JE JM JO JP '
  + 'KE KG KH KI KM KN KP KR KW KY KZ LA LB LC LI LK LR LS LT LU LV LY MA MC MD ME MF MG MH MK ML MM MN MO MP MQ MR MS MT '
  + 'MU MV MW MX MY MZ NA NC NE NF NG NI NL NO NP NR NU NZ OM PA PE PF PG PH PK PL PM PN PR PS PT PW PY QA RE RO RS RU RW '
  + 'SA SB SC SD SE SG SH SI SJ SK SL SM SN SO SR SS ST SV SX SY SZ TC TD TF TG TH TJ TK TL TM TN TO TR TT TV TW TZ UA UG '
  + 'UM US UY UZ VA VC VE VG VI VN VU WF WS YE YT ZA ZM ZW'
).split(' ')

const codeSet = new Set(countryCodes)

/** "Germany" for "DE", in English (the shop's language); the code itself where Intl has no name. */
export function countryName(code: string): string {
  try {
    return new Intl.DisplayNames(['en'], { type: 'region' }).of(code) ?? code
  }
  catch {
    return code
  }
}

let byName: Map<string, string> | undefined
const fold = (text: string) => text.normalize('NFD').replace(/[\u0300-\u036F]/g, '').replace(/[^a-z0-9]/gi, '').toLowerCase()

/**
 * The code for what an address says: a code in any case ("us", "US") or an English country name
 * ("United States", "germany"); null for anything else.
 */
export function countryCodeFor(input: string): string | null {
  const text = input.trim()
  if (/^[a-z]{2}$/i.test(text)) return codeSet.has(text.toUpperCase()) ? text.toUpperCase() : null
  byName ??= new Map(countryCodes.map(code => [fold(countryName(code)), code]))
  return byName.get(fold(text)) ?? null
}

/** US states and DC by name, so "Texas" and "TX" are the same region (ISO 3166-2:US). */
const usStates: Record<string, string> = {
  alabama: 'AL', alaska: 'AK', arizona: 'AZ', arkansas: 'AR', california: 'CA', colorado: 'CO', connecticut: 'CT', delaware: 'DE',
  districtofcolumbia: 'DC', florida: 'FL', georgia: 'GA', hawaii: 'HI', idaho: 'ID', illinois: 'IL', indiana: 'IN', iowa: 'IA',
  kansas: 'KS', kentucky: 'KY', louisiana: 'LA', maine: 'ME', maryland: 'MD', massachusetts: 'MA', michigan: 'MI', minnesota: 'MN',
  mississippi: 'MS', missouri: 'MO', montana: 'MT', nebraska: 'NE', nevada: 'NV', newhampshire: 'NH', newjersey: 'NJ', newmexico: 'NM',
  newyork: 'NY', northcarolina: 'NC', northdakota: 'ND', ohio: 'OH', oklahoma: 'OK', oregon: 'OR', pennsylvania: 'PA', rhodeisland: 'RI',
  southcarolina: 'SC', southdakota: 'SD', tennessee: 'TN', texas: 'TX', utah: 'UT', vermont: 'VT', virginia: 'VA', washington: 'WA',
  westvirginia: 'WV', wisconsin: 'WI', wyoming: 'WY',
}

/** A region as the rules keep it: upper-case letters and digits ("TX"); a US state's name becomes its code. */
export function regionCodeFor(country: string, region: string | undefined): string {
  const folded = fold(region ?? '')
  if (country === 'US' && usStates[folded]) return usStates[folded]
  return folded.toUpperCase()
}

export interface AddressPlace {
  country: string | null
  region: string
  zone: string
  zoneLabel: string
  taxRegion: string
  taxLabel: string
  rateBasisPoints: number
}

type Prices = EngineSettings['prices']

function firstMatch<T extends { country: string, region?: string | undefined }>(rules: T[], country: string, region: string): T | undefined {
  return rules.find(rule => rule.country === country && rule.region && rule.region === region)
    ?? rules.find(rule => rule.country === country && !rule.region)
}

/**
 * The zone and tax region for an address: the first rule for its country and region, else the first
 * for its country alone, else the shop's defaults. Without a country (the cart before the address is
 * filled in) the shop's home country is assumed: the country of the first zone rule.
 */
export function placeForAddress(address: { country?: string | null, region?: string | null }, prices: Prices): AddressPlace {
  const country = address.country ? countryCodeFor(address.country) : null
  const assumed = country ?? prices.countryZones[0]?.country ?? null
  const region = assumed && country ? regionCodeFor(assumed, address.region ?? undefined) : ''
  const zone = (assumed && firstMatch(prices.countryZones, assumed, region)?.zone) || prices.defaultZone
  const taxRegion = (assumed && firstMatch(prices.taxRules, assumed, region)?.taxRegion) || prices.defaultTaxRegion
  const zoneRow = prices.shippingZones.find(row => row.id === zone)
  const taxRow = prices.taxRegions.find(row => row.id === taxRegion)
  return { country, region, zone, zoneLabel: zoneRow?.label ?? zone, taxRegion, taxLabel: taxRow?.label ?? taxRegion, rateBasisPoints: taxRow?.rateBasisPoints ?? 0 }
}

/** The parts of a postal address that are written out (the shape every order keeps). */
export interface WrittenAddress {
  name?: string | null
  line1?: string | null
  line2?: string | null
  city?: string | null
  region?: string | null
  postalCode?: string | null
  country?: string | null
}

/** Each present part trimmed, the empty ones left out, joined by `glue`: no stray space or comma. */
const joinParts = (parts: (string | null | undefined)[], glue: string) =>
  parts.map(part => (part ?? '').trim()).filter(Boolean).join(glue)

/** The town line as an address label writes it: "90210 Lowmere, CA" ("Lowmere, CA" without a postal code). */
export function addressTownLine(address: WrittenAddress): string {
  return joinParts([joinParts([address.postalCode, address.city], ' '), address.region], ', ')
}

/** The address as its lines, top to bottom: name, street lines, town line, the country by name. */
export function addressAsLines(address: WrittenAddress): string[] {
  const country = (address.country ?? '').trim()
  return [address.name, address.line1, address.line2, addressTownLine(address), country ? countryName(country) : '']
    .map(line => (line ?? '').trim()).filter(Boolean)
}

/** The address on one line, its parts separated by commas (an order page, a mail). */
export const addressOneLine = (address: WrittenAddress) => addressAsLines(address).join(', ')
