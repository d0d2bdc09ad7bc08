// The workshop figures form, section by section: each field's path in the `engine` setting
// (shared/utils/engineSettings.ts), its label, kind and hint, and the lists edited row by row.
// A new shop figure gets a line here.
// Temperatures and weights ('celsius', 'fahrenheit', 'celsiusStep', 'grams': the stored unit) are shown
// and typed in the shop's units, their label naming the unit.
export type FigureKind = 'number' | 'int' | 'length' | 'money' | 'bool' | 'text' | 'celsius' | 'fahrenheit' | 'celsiusStep' | 'grams'
export interface FigureField { path: string, label: string, kind: FigureKind, hint?: string }
export interface FigureRows { path: string, title: string, item: string, columns: FigureField[], blank: () => Record<string, unknown> }
export interface FigureSection { id: string, title: string, lead: string, caution?: string, fields: FigureField[], rows?: FigureRows[] }

/** One figure as a line of a table: its path (after the section's prefix), label, kind (a number unless said) and hint. */
type Line = [path: string, label: string, kind?: FigureKind, hint?: string]

/** The fields of a table of lines, each path behind `prefix`. */
function figures(prefix: string, lines: Line[]): FigureField[] {
  return lines.map(([path, label, kind = 'number', hint]) => ({ path: `${prefix}${path}`, label, kind, ...(hint ? { hint } : {}) }))
}

/** A list edited row by row; a new row starts empty (a yes/no unticked). Most lists start with a code and a name. */
function list(path: string, title: string, item: string, lines: Line[], named = true): FigureRows {
  const columns = figures('', named ? [['id', 'Code', 'text'], ['label', 'Name', 'text'], ...lines] : lines)
  return { path, title, item, columns, blank: () => Object.fromEntries(columns.map(column => [column.path, column.kind === 'bool' ? false : ''])) }
}

/** A rule that sends a country (or one of its regions) to a zone or tax region by its code. */
const countryRule = (path: string, title: string, item: string, target: Line): FigureRows =>
  list(path, title, item, [['country', 'Country (ISO code, e.g. US)', 'text'], ['region', 'State or region (code; empty = all)', 'text'], target], false)

/** The usual cautions of the sections whose work can hurt, shown above their fields. */
const cautions: Record<string, string> = {
  reaming: 'Reamers are sharp and wax dust irritates the lungs: keep fingers clear of the cutting edge, work with extraction or a dust mask. Local codes and licensed practice come first.',
  shaving: 'The shaving knife is sharp and the mandrel turns under power: stop the machine before touching the cutter; keep hair and sleeves clear. Local codes and licensed practice come first.',
  heat: 'A delivery van can reach about 60 °C inside; wax softens long before. Ship early in the week.',
  packing: 'Lift heavy cartons with a straight back; a parcel left in the sun gets hot enough to ruin wax. Your carrier\'s rules come first.',
}

/** A section of the form: its heading and lead (and caution), its fields as lines behind `prefix`, and its lists. */
function section(heading: Pick<FigureSection, 'id' | 'title' | 'lead'>, prefix: string, lines: Line[], rows?: FigureRows[]): FigureSection {
  const caution = cautions[heading.id]
  return { ...heading, ...(caution ? { caution } : {}), fields: figures(prefix, lines), ...(rows ? { rows } : {}) }
}

const weekdays = ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday']
const shipOn = weekdays.map((day): Line => [`shipOn.${day}`, `Ship on ${day[0]!.toUpperCase()}${day.slice(1)}s`, 'bool'])

export const engineFigureSections: FigureSection[] = [
  section({ id: 'speech', title: 'Speaking and message fit', lead: 'How the message meter turns words into spoken seconds.' }, 'speech.', [
    ['wordsPerMinute', 'Speaking rate (words a minute)', 'number', 'About 150 (from memory); time a few of your own readings.'],
    ['leadInSeconds', 'Lead-in (seconds)'],
    ['runOutSeconds', 'Run-out (seconds)'],
    ['tightMargin', '"Tight" within the last share of the capacity', 'number', '0.1 = the last 10 %.'],
  ]),
  section({ id: 'production', title: 'Production', lead: 'When a made-to-order cylinder is due.' }, 'production.', [['leadTimeDays', 'Days from payment to due date', 'int']]),
  section({ id: 'custom', title: 'Personal messages', lead: 'Rush, proofs and re-cuts of messages cut to order.' }, 'custom.', [
    ['rushLeadTimeDays', 'Days from payment to due date, rushed', 'int'],
    ['freeRecuts', 'Free re-cuts per message', 'int'],
    ['paidRecutMinor', 'Price of a further re-cut', 'money'],
    ['proofReminderDays', 'Days before a proof reminder', 'int'],
  ]),
  section({ id: 'dispatch', title: 'Dispatch', lead: 'Shipping days, carriers and breakage claims.' }, 'dispatch.', [
    ...shipOn,
    ['heatRecheckDays', 'Days before a held parcel is checked again', 'int'],
    ['claimWindowDays', 'Days after delivery to report a breakage', 'int'],
  ], [list('dispatch.carriers', 'Carriers', 'carrier', [])]),
  section({ id: 'formats', title: 'Cylinder formats', lead: 'Recorded length of each format and the standard speed.' }, '', [
    ['formats.two_minute.recordableLengthIn', '2-minute: recorded length (in)', 'length'],
    ['formats.four_minute.recordableLengthIn', '4-minute: recorded length (in)', 'length'],
    ['standardRpm', 'Standard speed (rpm)'],
  ]),
  section({ id: 'reaming', title: 'Reaming', lead: 'Seat travel per reaming and the finished overhang on the mandrel.' }, 'reaming.', [
    ['perReamingIn', 'Seat travel per reaming (in)', 'length', 'About 1/16 in (common practice, no source).'],
    ['setSize', 'Reamings per set', 'int'],
    ['targetOverhangIn', 'Finished overhang (in)', 'length', 'About 7/16 in (common practice, no source).'],
  ]),
  section({ id: 'shaving', title: 'Shaving', lead: 'The in-feed wheel, the deepest cut and the smallest diameter you still shave.' }, 'shaving.', [
    ['infeedPer45DegreesIn', 'Cutter feed per 45° of the wheel (in)', 'length', '0.003 in (common practice, no source).'],
    ['maxCutPerPassIn', 'Deepest cut per pass, on the radius (in)', 'length'],
    ['depthPerSurfaceIn', 'Radial depth per fresh surface (in)', 'length'],
    ['minimumDiameterIn', 'Smallest diameter still shaved (in)', 'length'],
  ]),
  section({ id: 'fit', title: 'Fit, mandrel and wax', lead: 'The temperature fit is judged at, the bore, the mandrel\'s taper and the expansion of each wax.' }, 'fit.', [
    ['referenceTemperatureF', 'Fit judged at', 'fahrenheit', 'About 75 °F, 24 °C (common practice, no source).'],
    ['boreDiameterIn', 'Bore diameter (in)', 'length'],
    ['taper.perFootIn', 'Mandrel taper, diameter per foot (in)', 'length', 'About 3/8 in per foot is from memory: measure your own mandrel.'],
    ['taper.unverified', 'The taper is not yet measured on our own mandrel (results say so)', 'bool'],
  ], [list('fit.waxFormulas', 'Wax formulas', 'Wax', [
    ['volumetricExpansionPerK', 'Volumetric expansion (per K)', 'number', 'e.g. 0.00081 for stearic acid (engineering handbook tables).'],
  ])]),
  section({ id: 'heat', title: 'Heat holds', lead: 'Forecast highs at the destination from which a parcel ships with care, or waits.' }, 'heat.', [
    ['cautionHighC', 'Ship with care from', 'celsius'],
    ['holdHighC', 'Hold the parcel from', 'celsius'],
    ['stricterPerTransitDayC', 'Stricter per extra day in transit', 'celsiusStep'],
  ]),
  section({ id: 'packing', title: 'Packing', lead: 'Tubes, boxes and weights for choosing the smallest box and the billable weight.' }, 'packing.', [
    ['cushioningIn', 'Cushioning on every side (in)', 'number', 'At least 2 in (carrier packing guidance).'],
    ['doubleBoxFragile', 'Double-box fragile goods', 'bool'],
    ['dimensionalDivisorIn3PerLb', 'Dimensional divisor (in³ per lb)', 'number', 'Your carrier\'s figure; 139 is common in the US.'],
    ['cylinderWeightG', 'A cylinder weighs', 'grams'],
    ['fillerWeightG', 'Filler per parcel', 'grams'],
    ['cylindersPerParcel', 'Most cylinders per parcel', 'int'],
  ], [
    list('packing.tubes', 'Tubes', 'Tube', [
      ['insideDiameterIn', 'Inside diameter (in)'],
      ['insideLengthIn', 'Inside length (in)'],
      ['outsideDiameterIn', 'Outside diameter (in)'],
      ['outsideLengthIn', 'Outside length (in)'],
      ['weightG', 'Weight', 'grams'],
    ]),
    list('packing.boxes', 'Boxes', 'Box', [
      ['inside.lengthIn', 'Inside length (in)'],
      ['inside.widthIn', 'Inside width (in)'],
      ['inside.heightIn', 'Inside height (in)'],
      ['wallIn', 'Wall (in)'],
      ['weightG', 'Weight', 'grams'],
    ]),
  ]),
  section({ id: 'prices', title: 'Prices, shipping and tax', lead: 'Amounts are in the currency below, with its usual decimals.' }, 'prices.', [
    ['currency', 'Currency (ISO code)', 'text'],
    ['blankMinor.two_minute', 'Blank, 2-minute', 'money'],
    ['blankMinor.four_minute', 'Blank, 4-minute', 'money'],
    ['customMessage.baseMinor', 'Personal message, base price', 'money'],
    ['customMessage.includedSeconds', 'Spoken seconds the base covers'],
    ['customMessage.perExtra30sMinor', 'Each started 30 s more', 'money'],
    ['customMessage.fourMinuteSurchargeMinor', '4-minute surcharge', 'money'],
    ['customMessage.rushMinor', 'Rush', 'money'],
    ['defaultZone', 'Zone for countries without a rule (code)', 'text'],
    ['defaultTaxRegion', 'Tax region for addresses without a rule (code)', 'text'],
  ], [
    list('prices.shippingZones', 'Shipping zones', 'Zone', [['firstParcelMinor', 'First parcel', 'money'], ['additionalParcelMinor', 'Each further parcel', 'money']]),
    list('prices.taxRegions', 'Tax regions', 'Region', [['rateBasisPoints', 'Rate (basis points; 825 = 8.25 %)', 'int'], ['taxShipping', 'Tax shipping too', 'bool']]),
    countryRule('prices.countryZones', 'Shipping zone by country', 'Country rule', ['zone', 'Zone code', 'text']),
    countryRule('prices.taxRules', 'Tax region by country', 'Tax rule', ['taxRegion', 'Tax region code', 'text']),
  ]),
]
