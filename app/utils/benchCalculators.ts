/**
 * The words of a bench calculator's card: its name in the page's list of calculators, the heading, the
 * line under it, the button, the prompt shown until there is an answer, a standing caution (its
 * first words in bold), where the work can go wrong for good, and the rule the answer is worked out by,
 * at the card's foot. A rule that names the room temperature fit is judged at (about 75 °F) is given it
 * written in the shop's units. A calculator that gives a verdict has the words and colour of each one.
 */
interface BenchWords {
  short: string
  title: string
  lead: string
  submitLabel: string
  prompt: string
  caution?: { title: string, text: string }
  rule: string | ((room: string) => string)
  verdicts?: Record<string, { label: string, tone: 'good' | 'care' | 'bad' }>
}

/** The bench calculators in the order the page shows them, each under the anchor its card is found at. */
const words = {
  'reaming': {
    short: 'Reaming',
    title: 'Reaming plan',
    lead: 'How many more reamings until the blank seats at the wanted overhang on the mandrel.',
    submitLabel: 'Plan the reaming',
    prompt: 'Type the overhang you read on the mandrel and press “Plan the reaming”.',
    caution: { title: 'Over-reaming cannot be undone.', text: 'Ream one set, then check the fit on the mandrel before the next; a bore opened too far cannot be closed again.' },
    rule: room => 'Travel still needed = wanted overhang − overhang now. One reaming moves the seat about 1/16 in, so the '
      + 'reamings are the travel divided by the travel per reaming, rounded up, done in sets (usually four) with the '
      + 'fit checked after each set: 3/16 in showing with 7/16 in wanted is 4/16 in to go, 4 reamings. Read the '
      + `overhang at room temperature, about ${room}; a warm blank sits further on. Common practice, no published source.`,
  },
  'shaving': {
    short: 'Shaving',
    title: 'Shaving plan',
    lead: 'Passes of the cutter to a clean, continuous surface, and what the blank has left after.',
    submitLabel: 'Plan the shaving',
    prompt: 'Read the diameter at several places around the blank, type the largest and smallest, and press “Plan the shaving”.',
    caution: { title: 'Cut no deeper than needed.', text: 'Every thousandth taken off now is wax a later surface cannot use; take about 0.003 in a pass at most.' },
    rule: '45° of the in-feed wheel feeds the cutter 0.003 in, so a full turn feeds 0.024 in (common practice, no '
      + 'source). The surface is clean once the cut reaches the low spot: depth = (largest − smallest diameter) ÷ 2, '
      + 'and the passes are that depth divided by the in-feed, rounded up, at least one. Each pass takes the in-feed '
      + 'off the radius, so the diameter falls by twice the in-feed. Surfaces left = (diameter after − minimum) ÷ '
      + '(2 × depth per surface), whole ones only.',
  },
  'playing-time': {
    short: 'Playing time',
    title: 'Playing time',
    lead: 'How long a length of groove plays, and how fast it passes under the stylus.',
    submitLabel: 'Work out the time',
    prompt: 'The standard 2-minute record is filled in; change any figure and press “Work out the time”.',
    rule: 'Playing time (min) = recorded length (in) × grooves per inch ÷ rpm: 3.6 in × 100 ÷ 160 = 2.25 min. '
      + 'Surface speed = π × diameter × rpm ÷ 60; turns per second = rpm ÷ 60; groove pitch = 25.4 mm ÷ grooves per '
      + 'inch (1 in = 25.4 mm exactly).',
  },
  'message-fit': {
    short: 'Message fit',
    title: 'Message fit',
    lead: 'Whether a personal message\'s script fits the record, as the customer\'s meter shows it.',
    submitLabel: 'Check the fit',
    prompt: 'Paste a script and press “Check the fit”.',
    rule: 'Words are counted as a reader says them (“1905” is three words, “42” two) at the shop\'s speaking rate, about '
      + '150 words a minute (from memory), plus a silent lead-in and run-out. The format holds its recordable length\'s '
      + 'playing time; within the last tenth of it a message is tight.',
    verdicts: { fits: { label: 'Fits', tone: 'good' }, tight: { label: 'Tight', tone: 'care' }, too_long: { label: 'Too long', tone: 'bad' } },
  },
  'heat-fit': {
    short: 'Heat and fit',
    title: 'Heat and fit',
    lead: 'Where a warm or cold blank sits on the mandrel, compared with where it sat when its fit was judged.',
    submitLabel: 'Work out the shift',
    prompt: 'Type the blank\'s temperature and press “Work out the shift”.',
    rule: room => 'The bore\'s linear expansion is about a third of the wax\'s volumetric coefficient (engineering handbook '
      + 'tables: stearic acid 810, paraffin 590 × 10⁻⁶ per K); it grows by bore × linear coefficient × the difference '
      + `from the reference temperature, about ${room}, and slides further along the taper by that growth ÷ (taper `
      + 'per foot ÷ 12). The taper is from memory until the shop measures its own mandrel.',
  },
  'heat-risk': {
    short: 'Heat in transit',
    title: 'Heat risk in transit',
    lead: 'Whether a parcel of wax should travel to this forecast, and when to send it.',
    submitLabel: 'Check the heat risk',
    prompt: 'Type the forecast high and the days in transit and press “Check the heat risk”.',
    rule: 'The shop sets a caution and a hold threshold for the forecast high; both drop a little for each day in transit '
      + 'beyond the first, since every day is another afternoon in a van, and van interiors can reach about 60 °C '
      + '(shipping guidance). Parcels go early in the week so they are not left in a depot over the weekend.',
    verdicts: { ok: { label: 'OK to ship', tone: 'good' }, caution: { label: 'Ship with care', tone: 'care' }, hold: { label: 'Hold the parcel', tone: 'bad' } },
  },
} satisfies Record<string, BenchWords>

export type BenchCalculatorName = keyof typeof words
export const benchCalculators: Record<BenchCalculatorName, BenchWords> = words
