/**
 * The words of a bench calculator's card: its name in the page's list of calculators, the heading, the
 * line under it, the button, the prompt shown until there is an answer and a standing caution (its
 * first words in bold), where the work can go wrong for good.
 */
interface BenchWords {
  short: string
  title: string
  lead: string
  submitLabel: string
  prompt: string
  caution?: { title: string, text: string }
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
  },
  'shaving': {
    short: 'Shaving',
    title: 'Shaving plan',
    lead: 'Passes of the cutter to a clean, continuous surface, and what the blank has left after.',
    submitLabel: 'Plan the shaving',
    prompt: 'Read the diameter at several places around the blank, type the largest and smallest, and press “Plan the shaving”.',
    caution: { title: 'Cut no deeper than needed.', text: 'Every thousandth taken off now is wax a later surface cannot use; take about 0.003 in a pass at most.' },
  },
  'playing-time': {
    short: 'Playing time',
    title: 'Playing time',
    lead: 'How long a length of groove plays, and how fast it passes under the stylus.',
    submitLabel: 'Work out the time',
    prompt: 'The standard 2-minute record is filled in; change any figure and press “Work out the time”.',
  },
  'message-fit': {
    short: 'Message fit',
    title: 'Message fit',
    lead: 'Whether a personal message\'s script fits the record, as the customer\'s meter shows it.',
    submitLabel: 'Check the fit',
    prompt: 'Paste a script and press “Check the fit”.',
  },
  'heat-fit': {
    short: 'Heat and fit',
    title: 'Heat and fit',
    lead: 'Where a warm or cold blank sits on the mandrel, compared with where it sat when its fit was judged.',
    submitLabel: 'Work out the shift',
    prompt: 'Type the blank\'s temperature and press “Work out the shift”.',
  },
  'heat-risk': {
    short: 'Heat in transit',
    title: 'Heat risk in transit',
    lead: 'Whether a parcel of wax should travel to this forecast, and when to send it.',
    submitLabel: 'Check the heat risk',
    prompt: 'Type the forecast high and the days in transit and press “Check the heat risk”.',
  },
} satisfies Record<string, BenchWords>

export type BenchCalculatorName = keyof typeof words
export const benchCalculators: Record<BenchCalculatorName, BenchWords> = words
