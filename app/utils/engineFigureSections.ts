// The workshop figures form, section by section: each field's path in the `engine` setting
// (shared/utils/engineSettings.ts), its label, kind and hint, and the lists edited row by row.
// A new shop figure gets a line here.
export type FigureKind = 'number' | 'int' | 'length' | 'money' | 'bool' | 'text'
export interface FigureField { path: string, label: string, kind: FigureKind, hint?: string }
export interface FigureRows { path: string, title: string, item: string, columns: FigureField[], blank: () => Record<string, unknown> }
export interface FigureSection { id: string, title: string, lead: string, caution?: string, fields: FigureField[], rows?: FigureRows[] }

export const engineFigureSections: FigureSection[] = [
  {
    id: 'speech',
    title: 'Speaking and message fit',
    lead: 'How the message meter turns words into spoken seconds.',
    fields: [
      { path: 'speech.wordsPerMinute', label: 'Speaking rate (words a minute)', kind: 'number', hint: 'About 150 (from memory); time a few of your own readings.' },
      { path: 'speech.leadInSeconds', label: 'Lead-in (seconds)', kind: 'number' },
      { path: 'speech.runOutSeconds', label: 'Run-out (seconds)', kind: 'number' },
      { path: 'speech.tightMargin', label: '"Tight" within the last share of the capacity', kind: 'number', hint: '0.1 = the last 10 %.' },
    ],
  },
  {
    id: 'production',
    title: 'Production',
    lead: 'When a made-to-order cylinder is due.',
    fields: [
      { path: 'production.leadTimeDays', label: 'Days from payment to due date', kind: 'int' },
    ],
  },
  {
    id: 'custom',
    title: 'Personal messages',
    lead: 'Rush, proofs and re-cuts of messages cut to order.',
    fields: [
      { path: 'custom.rushLeadTimeDays', label: 'Days from payment to due date, rushed', kind: 'int' },
      { path: 'custom.freeRecuts', label: 'Free re-cuts per message', kind: 'int' },
      { path: 'custom.paidRecutMinor', label: 'Price of a further re-cut', kind: 'money' },
      { path: 'custom.proofReminderDays', label: 'Days before a proof reminder', kind: 'int' },
    ],
  },
  {
    id: 'dispatch',
    title: 'Dispatch',
    lead: 'Shipping days, carriers and breakage claims.',
    fields: [
      { path: 'dispatch.shipOn.monday', label: 'Ship on Mondays', kind: 'bool' },
      { path: 'dispatch.shipOn.tuesday', label: 'Ship on Tuesdays', kind: 'bool' },
      { path: 'dispatch.shipOn.wednesday', label: 'Ship on Wednesdays', kind: 'bool' },
      { path: 'dispatch.shipOn.thursday', label: 'Ship on Thursdays', kind: 'bool' },
      { path: 'dispatch.shipOn.friday', label: 'Ship on Fridays', kind: 'bool' },
      { path: 'dispatch.shipOn.saturday', label: 'Ship on Saturdays', kind: 'bool' },
      { path: 'dispatch.shipOn.sunday', label: 'Ship on Sundays', kind: 'bool' },
      { path: 'dispatch.heatRecheckDays', label: 'Days before a held parcel is checked again', kind: 'int' },
      { path: 'dispatch.claimWindowDays', label: 'Days after delivery to report a breakage', kind: 'int' },
    ],
    rows: [
      { path: 'dispatch.carriers', title: 'Carriers', item: 'carrier', columns: [{ path: 'id', label: 'Code', kind: 'text' }, { path: 'label', label: 'Name', kind: 'text' }], blank: () => ({ id: '', label: '' }) },
    ],
  },
  {
    id: 'formats',
    title: 'Cylinder formats',
    lead: 'Recorded length of each format and the standard speed.',
    fields: [
      { path: 'formats.two_minute.recordableLengthIn', label: '2-minute: recorded length (in)', kind: 'length' },
      { path: 'formats.four_minute.recordableLengthIn', label: '4-minute: recorded length (in)', kind: 'length' },
      { path: 'standardRpm', label: 'Standard speed (rpm)', kind: 'number' },
    ],
  },
  {
    id: 'reaming',
    title: 'Reaming',
    lead: 'Seat travel per reaming and the finished overhang on the mandrel.',
    caution: 'Reamers are sharp and wax dust irritates the lungs: keep fingers clear of the cutting edge, work with extraction or a dust mask. Local codes and licensed practice come first.',
    fields: [
      { path: 'reaming.perReamingIn', label: 'Seat travel per reaming (in)', kind: 'length', hint: 'About 1/16 in (common practice, no source).' },
      { path: 'reaming.setSize', label: 'Reamings per set', kind: 'int' },
      { path: 'reaming.targetOverhangIn', label: 'Finished overhang (in)', kind: 'length', hint: 'About 7/16 in (common practice, no source).' },
    ],
  },
  {
    id: 'shaving',
    title: 'Shaving',
    lead: 'The in-feed wheel, the deepest cut and the smallest diameter you still shave.',
    caution: 'The shaving knife is sharp and the mandrel turns under power: stop the machine before touching the cutter; keep hair and sleeves clear. Local codes and licensed practice come first.',
    fields: [
      { path: 'shaving.infeedPer45DegreesIn', label: 'Cutter feed per 45° of the wheel (in)', kind: 'length', hint: '0.003 in (common practice, no source).' },
      { path: 'shaving.maxCutPerPassIn', label: 'Deepest cut per pass, on the radius (in)', kind: 'length' },
      { path: 'shaving.depthPerSurfaceIn', label: 'Radial depth per fresh surface (in)', kind: 'length' },
      { path: 'shaving.minimumDiameterIn', label: 'Smallest diameter still shaved (in)', kind: 'length' },
    ],
  },
  {
    id: 'fit',
    title: 'Fit, mandrel and wax',
    lead: 'The temperature fit is judged at, the bore, the mandrel\'s taper and the expansion of each wax.',
    fields: [
      { path: 'fit.referenceTemperatureF', label: 'Fit judged at (°F)', kind: 'number', hint: 'About 75 °F (common practice, no source).' },
      { path: 'fit.boreDiameterIn', label: 'Bore diameter (in)', kind: 'length' },
      { path: 'fit.taper.perFootIn', label: 'Mandrel taper, diameter per foot (in)', kind: 'length', hint: 'About 3/8 in per foot is from memory: measure your own mandrel.' },
      { path: 'fit.taper.unverified', label: 'The taper is not yet measured on our own mandrel (results say so)', kind: 'bool' },
    ],
    rows: [{
      path: 'fit.waxFormulas',
      title: 'Wax formulas',
      item: 'Wax',
      columns: [
        { path: 'id', label: 'Code', kind: 'text' },
        { path: 'label', label: 'Name', kind: 'text' },
        { path: 'volumetricExpansionPerK', label: 'Volumetric expansion (per K)', kind: 'number', hint: 'e.g. 0.00081 for stearic acid (engineering handbook tables).' },
      ],
      blank: () => ({ id: '', label: '', volumetricExpansionPerK: '' }),
    }],
  },
  {
    id: 'heat',
    title: 'Heat holds',
    lead: 'Forecast highs at the destination from which a parcel ships with care, or waits.',
    caution: 'A delivery van can reach about 60 °C inside; wax softens long before. Ship early in the week.',
    fields: [
      { path: 'heat.cautionHighC', label: 'Ship with care from (°C)', kind: 'number' },
      { path: 'heat.holdHighC', label: 'Hold the parcel from (°C)', kind: 'number' },
      { path: 'heat.stricterPerTransitDayC', label: 'Stricter per extra day in transit (°C)', kind: 'number' },
    ],
  },
  {
    id: 'packing',
    title: 'Packing',
    lead: 'Tubes, boxes and weights for choosing the smallest box and the billable weight.',
    caution: 'Lift heavy cartons with a straight back; a parcel left in the sun gets hot enough to ruin wax. Your carrier\'s rules come first.',
    fields: [
      { path: 'packing.cushioningIn', label: 'Cushioning on every side (in)', kind: 'number', hint: 'At least 2 in (carrier packing guidance).' },
      { path: 'packing.doubleBoxFragile', label: 'Double-box fragile goods', kind: 'bool' },
      { path: 'packing.dimensionalDivisorIn3PerLb', label: 'Dimensional divisor (in³ per lb)', kind: 'number', hint: 'Your carrier\'s figure; 139 is common in the US.' },
      { path: 'packing.cylinderWeightG', label: 'A cylinder weighs (g)', kind: 'number' },
      { path: 'packing.fillerWeightG', label: 'Filler per parcel (g)', kind: 'number' },
      { path: 'packing.cylindersPerParcel', label: 'Most cylinders per parcel', kind: 'int' },
    ],
    rows: [
      {
        path: 'packing.tubes',
        title: 'Tubes',
        item: 'Tube',
        columns: [
          { path: 'id', label: 'Code', kind: 'text' },
          { path: 'label', label: 'Name', kind: 'text' },
          { path: 'insideDiameterIn', label: 'Inside diameter (in)', kind: 'number' },
          { path: 'insideLengthIn', label: 'Inside length (in)', kind: 'number' },
          { path: 'outsideDiameterIn', label: 'Outside diameter (in)', kind: 'number' },
          { path: 'outsideLengthIn', label: 'Outside length (in)', kind: 'number' },
          { path: 'weightG', label: 'Weight (g)', kind: 'number' },
        ],
        blank: () => ({ id: '', label: '', insideDiameterIn: '', insideLengthIn: '', outsideDiameterIn: '', outsideLengthIn: '', weightG: '' }),
      },
      {
        path: 'packing.boxes',
        title: 'Boxes',
        item: 'Box',
        columns: [
          { path: 'id', label: 'Code', kind: 'text' },
          { path: 'label', label: 'Name', kind: 'text' },
          { path: 'inside.lengthIn', label: 'Inside length (in)', kind: 'number' },
          { path: 'inside.widthIn', label: 'Inside width (in)', kind: 'number' },
          { path: 'inside.heightIn', label: 'Inside height (in)', kind: 'number' },
          { path: 'wallIn', label: 'Wall (in)', kind: 'number' },
          { path: 'weightG', label: 'Weight (g)', kind: 'number' },
        ],
        blank: () => ({ 'id': '', 'label': '', 'inside.lengthIn': '', 'inside.widthIn': '', 'inside.heightIn': '', 'wallIn': '', 'weightG': '' }),
      },
    ],
  },
  {
    id: 'prices',
    title: 'Prices, shipping and tax',
    lead: 'Amounts are in the currency below, with its usual decimals.',
    fields: [
      { path: 'prices.currency', label: 'Currency (ISO code)', kind: 'text' },
      { path: 'prices.blankMinor.two_minute', label: 'Blank, 2-minute', kind: 'money' },
      { path: 'prices.blankMinor.four_minute', label: 'Blank, 4-minute', kind: 'money' },
      { path: 'prices.customMessage.baseMinor', label: 'Personal message, base price', kind: 'money' },
      { path: 'prices.customMessage.includedSeconds', label: 'Spoken seconds the base covers', kind: 'number' },
      { path: 'prices.customMessage.perExtra30sMinor', label: 'Each started 30 s more', kind: 'money' },
      { path: 'prices.customMessage.fourMinuteSurchargeMinor', label: '4-minute surcharge', kind: 'money' },
      { path: 'prices.customMessage.rushMinor', label: 'Rush', kind: 'money' },
      { path: 'prices.defaultZone', label: 'Zone for countries without a rule (code)', kind: 'text' },
      { path: 'prices.defaultTaxRegion', label: 'Tax region for addresses without a rule (code)', kind: 'text' },
    ],
    rows: [
      {
        path: 'prices.shippingZones',
        title: 'Shipping zones',
        item: 'Zone',
        columns: [
          { path: 'id', label: 'Code', kind: 'text' },
          { path: 'label', label: 'Name', kind: 'text' },
          { path: 'firstParcelMinor', label: 'First parcel', kind: 'money' },
          { path: 'additionalParcelMinor', label: 'Each further parcel', kind: 'money' },
        ],
        blank: () => ({ id: '', label: '', firstParcelMinor: '', additionalParcelMinor: '' }),
      },
      {
        path: 'prices.taxRegions',
        title: 'Tax regions',
        item: 'Region',
        columns: [
          { path: 'id', label: 'Code', kind: 'text' },
          { path: 'label', label: 'Name', kind: 'text' },
          { path: 'rateBasisPoints', label: 'Rate (basis points; 825 = 8.25 %)', kind: 'int' },
          { path: 'taxShipping', label: 'Tax shipping too', kind: 'bool' },
        ],
        blank: () => ({ id: '', label: '', rateBasisPoints: '', taxShipping: false }),
      },
      {
        path: 'prices.countryZones',
        title: 'Shipping zone by country',
        item: 'Country rule',
        columns: [
          { path: 'country', label: 'Country (ISO code, e.g. US)', kind: 'text' },
          { path: 'region', label: 'State or region (code; empty = all)', kind: 'text' },
          { path: 'zone', label: 'Zone code', kind: 'text' },
        ],
        blank: () => ({ country: '', region: '', zone: '' }),
      },
      {
        path: 'prices.taxRules',
        title: 'Tax region by country',
        item: 'Tax rule',
        columns: [
          { path: 'country', label: 'Country (ISO code, e.g. US)', kind: 'text' },
          { path: 'region', label: 'State or region (code; empty = all)', kind: 'text' },
          { path: 'taxRegion', label: 'Tax region code', kind: 'text' },
        ],
        blank: () => ({ country: '', region: '', taxRegion: '' }),
      },
    ],
  },
]
