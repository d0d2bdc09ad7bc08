import { z } from 'zod'
import { idField } from './ids'

/*
 * Production tickets: one per cylinder to make. The stages are the product's own names:
 * queued → blank_assigned → cut → proof_sent → approved → to_dispatch → done, and `recut`, which
 * sends a cut cylinder back to blank_assigned. Shared by the routes (which enforce it) and the pages
 * (which offer only the moves it allows).
 */

export const ticketStages = ['queued', 'blank_assigned', 'cut', 'proof_sent', 'approved', 'to_dispatch', 'done'] as const
export type TicketStage = typeof ticketStages[number]

export const ticketStageLabels: Record<TicketStage, string> = {
  queued: 'Queued',
  blank_assigned: 'Blank assigned',
  cut: 'Cut',
  proof_sent: 'Proof sent',
  approved: 'Approved',
  to_dispatch: 'To dispatch',
  done: 'Done',
}

/** Custom messages go through a proof the customer approves; recorded cylinders go from the cut straight to dispatch. */
export type TicketKind = 'recorded' | 'custom'
export const ticketKindOf = (itemKind: string): TicketKind => (itemKind === 'custom' ? 'custom' : 'recorded')

/** Days from payment to the date a ticket is due, by default; the shop sets its own (Workshop figures › Production). */
export const ticketLeadTimeDays = 10

/** What happens on each move, and through which route: `assign` and `cut` need their own data. */
export type TicketMoveRoute = 'assign' | 'cut' | 'stage'

export interface TicketMoveRule {
  from: TicketStage
  to: TicketStage
  route: TicketMoveRoute
  /** Only for these kinds of ticket (both when absent). */
  kinds?: TicketKind[]
  /** The move is a recut: the cut is rejected and the cylinder is cut again. */
  recut?: boolean
  /** The order must be in one of these states. */
  orderStates?: string[]
  label: string
}

const recutFrom: TicketStage[] = ['cut', 'proof_sent', 'approved', 'to_dispatch']
/** Order states in which a cylinder may still be cut again: not once the parcel is packed. */
const stillInTheWorkshop = ['paid', 'in_production', 'proof_pending', 'ready_to_pack']

/** The whole transition table; anything not listed is refused. */
export const ticketMoveRules: TicketMoveRule[] = [
  { from: 'queued', to: 'blank_assigned', route: 'assign', label: 'Assign a tested blank' },
  { from: 'blank_assigned', to: 'blank_assigned', route: 'assign', label: 'Change the blank' },
  { from: 'blank_assigned', to: 'cut', route: 'cut', label: 'Record the cut' },
  { from: 'cut', to: 'proof_sent', route: 'stage', kinds: ['custom'], label: 'Proof sent to the customer' },
  { from: 'proof_sent', to: 'approved', route: 'stage', kinds: ['custom'], label: 'Customer approved the proof' },
  { from: 'approved', to: 'to_dispatch', route: 'stage', kinds: ['custom'], label: 'Ready for dispatch' },
  { from: 'cut', to: 'to_dispatch', route: 'stage', kinds: ['recorded'], label: 'Ready for dispatch' },
  ...recutFrom.map((from): TicketMoveRule => ({ from, to: 'blank_assigned', route: 'stage', recut: true, orderStates: stillInTheWorkshop, label: 'Recut' })),
  { from: 'to_dispatch', to: 'done', route: 'stage', orderStates: ['shipped', 'delivered'], label: 'Done (shipped)' },
]

/** Stages at which a ticket is still open: it holds its blank until it is done. */
export const openTicketStages = ticketStages.filter(stage => stage !== 'done')

/** A stage change by the maker: `recut` is the one named action, the rest are stages. */
export const ticketStageChangeSchema = z.object({
  to: z.enum([...ticketStages, 'recut'], { error: `to must be one of ${[...ticketStages, 'recut'].join(', ')}` }),
  note: z.string({ error: 'note must be text' }).trim().max(1000, 'note is at most 1000 characters').default(''),
})
export type TicketStageChange = z.infer<typeof ticketStageChangeSchema>

export const ticketAssignSchema = z.object({
  blankCode: z.string({ error: 'blankCode must be text' }).trim().toUpperCase().min(1, 'blankCode is required').max(40, 'blankCode is too long'),
})

const orderStateWords: Record<string, string> = {
  awaiting_payment: 'awaiting payment', paid: 'paid', in_production: 'being made', proof_pending: 'waiting for a proof',
  ready_to_pack: 'ready to pack', packed: 'packed', shipped: 'shipped', delivered: 'delivered', cancelled: 'cancelled', refunded: 'refunded',
}

/**
 * Why a move is refused (a sentence for a 409), or null when the table allows it. `to` may be
 * `recut`, which means blank_assigned from a later stage.
 */
export function ticketMoveProblem(
  ticket: { id: number, stage: TicketStage, kind: TicketKind },
  requested: TicketStage | 'recut',
  orderStatus: string,
  route: TicketMoveRoute,
): string | null {
  const name = `Ticket #${ticket.id}`
  const now = ticketStageLabels[ticket.stage].toLowerCase()
  const wantsRecut = requested === 'recut' || (requested === 'blank_assigned' && recutFrom.includes(ticket.stage))
  const to: TicketStage = requested === 'recut' ? 'blank_assigned' : requested
  if (wantsRecut && !recutFrom.includes(ticket.stage)) {
    return `${name} is ${now}: only a cylinder that has been cut can be sent back for a recut.`
  }
  const rule = ticketMoveRules.find(candidate => candidate.from === ticket.stage && candidate.to === to && !!candidate.recut === wantsRecut)
  if (!rule) {
    if (to === 'cut' && ticket.stage === 'queued') return `${name} has no blank yet: assign a tested blank before recording the cut.`
    if (to === 'done') return `${name} is ${now}: it can be done only after it has gone to dispatch and the order has shipped.`
    if (to === ticket.stage) return `${name} is already ${now}.`
    const onward = ticketMoveRules.filter(candidate => candidate.from === ticket.stage && (!candidate.kinds || candidate.kinds.includes(ticket.kind)))
      .map(candidate => candidate.recut ? 'recut' : ticketStageLabels[candidate.to].toLowerCase())
    return `${name} is ${now} and cannot go to ${ticketStageLabels[to].toLowerCase()}${onward.length ? `; from here it can go to: ${[...new Set(onward)].join(', ')}` : ''}.`
  }
  if (rule.kinds && !rule.kinds.includes(ticket.kind)) {
    return ticket.kind === 'custom'
      ? `${name} is a custom message: the customer hears and approves a proof before it goes to dispatch.`
      : `${name} is a recorded cylinder: it has no proof step and goes from the cut straight to dispatch.`
  }
  if (rule.route !== route) {
    return rule.route === 'assign'
      ? `${name} gets to ${ticketStageLabels[to].toLowerCase()} by assigning a blank (the blank picker), not by a stage change.`
      : `${name} gets to cut by recording the cut (recorder and date), not by a stage change.`
  }
  if (rule.orderStates && !rule.orderStates.includes(orderStatus)) {
    return rule.recut
      ? `${name} cannot be recut: its order is ${orderStateWords[orderStatus] ?? orderStatus}, and a packed or shipped cylinder is not cut again.`
      : `${name} cannot be done before dispatch: its order is ${orderStateWords[orderStatus] ?? orderStatus}, not shipped yet.`
  }
  return null
}

/** The moves the maker may be offered from here (the page shows them as buttons). */
export function ticketMovesFrom(ticket: { stage: TicketStage, kind: TicketKind }, orderStatus: string): TicketMoveRule[] {
  return ticketMoveRules.filter(rule => rule.from === ticket.stage
    && (!rule.kinds || rule.kinds.includes(ticket.kind))
    && (!rule.orderStates || rule.orderStates.includes(orderStatus)))
}

/** The order's state that its tickets call for: all at dispatch → ready to pack; a proof out → proof pending. */
export function orderStateForTickets(stages: TicketStage[]): 'ready_to_pack' | 'proof_pending' | 'in_production' | null {
  if (stages.length === 0) return null
  if (stages.every(stage => stage === 'to_dispatch' || stage === 'done')) return 'ready_to_pack'
  if (stages.some(stage => stage === 'proof_sent')) return 'proof_pending'
  return 'in_production'
}

/** Recording the cut: the recorder used and when (now when left out); a test recording may come with it. */
export const ticketCutSchema = z.object({
  recorderId: idField('recorderId', 'choose the recorder used'),
  cutAt: z.preprocess(value => (value === '' ? undefined : value), z.iso.datetime({ offset: true, error: 'cutAt must be a date and time' }).optional())
    .refine(value => value === undefined || Date.parse(value) <= Date.now() + 5 * 60_000, 'cutAt cannot be in the future'),
  notes: z.string({ error: 'notes must be text' }).trim().max(2000, 'notes is at most 2000 characters').default(''),
})
export type TicketCutInput = z.infer<typeof ticketCutSchema>
