import type { CylinderFormat } from './cylinder'

/*
 * The life of a blank, as the workshop names its states:
 *   cast → reamed → shaved → tested_pass | tested_fail → reserved → cut → shipped, and scrapped;
 *   a reshave returns a blank to `shaved` with one more surface used.
 *
 * The table below is the one place the rules live: the register's routes refuse anything it does not
 * allow with a 409 and the sentence from `blankActionRefusal`, and the blank's page offers only what
 * it allows. The moves marked `by: 'tickets'` belong to production tickets and dispatch; they are
 * listed so the whole cycle reads in one place.
 *
 *   action       from                                   to                       surface    while held
 *   ream         cast, reamed                           reamed                   —          —
 *   refit        shaved, tested_pass, tested_fail       reamed                   spent (+1) refused
 *   shave        reamed, shaved                         shaved                   —          —
 *   surfaceTest  shaved, tested_pass, tested_fail       tested_pass|tested_fail  —          refused
 *   testCut      shaved, tested_pass, tested_fail       cut                      —          refused
 *   reshave      shaved, tested_pass, tested_fail, cut  shaved                   spent (+1) refused
 *   scrap        cast … tested_fail, reserved, cut      scrapped                 —          refused
 *   reserve      tested_pass                            reserved                 (tickets)
 *   release      reserved                               tested_pass              (tickets)
 *   cut          reserved                               cut                      (tickets)
 *   ship         cut, reserved (a blank sold, packed)   shipped                  (dispatch)
 *
 * Decisions, and why:
 *  - Reaming stops once shaving has begun: the shaved surface is cut true to the bore as it sits on
 *    the mandrel, and opening the bore moves the blank along the taper, so the surface would run out
 *    of true. If the fit turns out wrong after all, the maker records a *refit*: the reaming is
 *    logged, the current surface is spent and the blank goes back to `reamed`, to be shaved afresh.
 *  - Shaving passes may follow one another while a surface is new (`shaved`, not yet tested). Once
 *    a surface has been tested, cutting it again is a *reshave*: a new surface, surfaces used + 1.
 *  - A surface may be tested again (a second play-through, e.g. after a bad recording): the latest
 *    test of the current surface decides the state.
 *  - Nothing that changes a blank's surface or state goes through while an open ticket holds the
 *    blank: the ticket must let it go first, so a customer's cylinder never changes under the ticket.
 *  - A test cut (a recorder's trial recording) made on a blank uses that blank's current surface:
 *    the groove is there for good, so the blank goes to `cut` and is no longer a tested blank a
 *    ticket could take. Only a blank with a fresh, unheld surface may take one (never one reserved
 *    for a customer, already cut, shipped or scrapped). A reshave from `cut` (no open ticket
 *    holding it: a test cut, or a cut a ticket rejected and let go) gives it a new surface.
 */

export const blankStates = ['cast', 'reamed', 'shaved', 'tested_pass', 'tested_fail', 'reserved', 'cut', 'shipped', 'scrapped'] as const
export type BlankState = typeof blankStates[number]

export const blankStateLabels: Record<BlankState, string> = {
  cast: 'Cast',
  reamed: 'Reamed',
  shaved: 'Shaved',
  tested_pass: 'Tested: pass',
  tested_fail: 'Tested: fail',
  reserved: 'Reserved',
  cut: 'Cut',
  shipped: 'Shipped',
  scrapped: 'Scrapped',
}

export const blankFormatLabels: Record<CylinderFormat, string> = {
  two_minute: '2-minute',
  four_minute: '4-minute',
}

export type BlankAction = 'ream' | 'refit' | 'shave' | 'surfaceTest' | 'testCut' | 'reshave' | 'scrap' | 'reserve' | 'release' | 'cut' | 'ship'

export interface BlankTransition {
  from: readonly BlankState[]
  /** The state after the move; a surface test goes to tested_pass or tested_fail by its verdict. */
  to: BlankState | 'by_verdict'
  /** The move uses up the current surface: surfaces used + 1. */
  spendsSurface: boolean
  /** Refused while an open ticket holds the blank. */
  unheldOnly: boolean
  /** The part of the app that makes the move. */
  by: 'register' | 'recorders' | 'tickets' | 'dispatch'
}

export const blankTransitions: Record<BlankAction, BlankTransition> = {
  ream: { from: ['cast', 'reamed'], to: 'reamed', spendsSurface: false, unheldOnly: false, by: 'register' },
  refit: { from: ['shaved', 'tested_pass', 'tested_fail'], to: 'reamed', spendsSurface: true, unheldOnly: true, by: 'register' },
  shave: { from: ['reamed', 'shaved'], to: 'shaved', spendsSurface: false, unheldOnly: false, by: 'register' },
  surfaceTest: { from: ['shaved', 'tested_pass', 'tested_fail'], to: 'by_verdict', spendsSurface: false, unheldOnly: true, by: 'register' },
  testCut: { from: ['shaved', 'tested_pass', 'tested_fail'], to: 'cut', spendsSurface: false, unheldOnly: true, by: 'recorders' },
  reshave: { from: ['shaved', 'tested_pass', 'tested_fail', 'cut'], to: 'shaved', spendsSurface: true, unheldOnly: true, by: 'register' },
  scrap: { from: ['cast', 'reamed', 'shaved', 'tested_pass', 'tested_fail', 'reserved', 'cut'], to: 'scrapped', spendsSurface: false, unheldOnly: true, by: 'register' },
  reserve: { from: ['tested_pass'], to: 'reserved', spendsSurface: false, unheldOnly: false, by: 'tickets' },
  release: { from: ['reserved'], to: 'tested_pass', spendsSurface: false, unheldOnly: false, by: 'tickets' },
  cut: { from: ['reserved'], to: 'cut', spendsSurface: false, unheldOnly: false, by: 'tickets' },
  ship: { from: ['cut', 'reserved'], to: 'shipped', spendsSurface: false, unheldOnly: false, by: 'dispatch' },
}

/** The open ticket holding a blank, as the refusal names it. */
export interface BlankHolder {
  ticketId: number
  orderNumber: string
}

const finished = (state: BlankState) => `It is ${blankStateLabels[state].toLowerCase()}`

/** Why `action` cannot be done to a blank in `state` now, in a sentence for the maker; null when it can. */
export function blankActionRefusal(action: BlankAction, state: BlankState, holder: BlankHolder | null = null): string | null {
  const rule = blankTransitions[action]
  if (rule.from.includes(state)) {
    if (rule.unheldOnly && holder) {
      return `Ticket #${holder.ticketId} (order ${holder.orderNumber}) holds this blank; release it from the ticket first.`
    }
    return null
  }
  if (state === 'scrapped') return action === 'scrap' ? 'This blank is already scrapped.' : 'This blank is scrapped: nothing more is done to it.'
  if (state === 'shipped') return 'This blank has been shipped: it is the customer\'s now.'
  switch (action) {
    case 'ream':
      if (state === 'shaved' || state === 'tested_pass' || state === 'tested_fail') {
        return 'Shaving has begun on this blank: reaming now would move it along the mandrel and leave the shaved surface running out of true. Record it as a refit instead (the current surface is spent and the blank goes back to reamed, to be shaved again).'
      }
      return `${finished(state)}: its bore is finished.`
    case 'refit':
      return state === 'cast' || state === 'reamed'
        ? 'Nothing has been shaved yet: record an ordinary reaming, not a refit.'
        : `${finished(state)}: its bore can no longer be changed.`
    case 'shave':
      if (state === 'cast') return 'Ream the bore first: the blank is shaved on the mandrel it seats on, so its fit must be right before the surface is cut.'
      if (state === 'tested_pass' || state === 'tested_fail') return 'This surface has been tested: cutting it again makes a new surface, so record a reshave.'
      return `${finished(state)}: its surface is no longer shaved.`
    case 'surfaceTest':
      return state === 'cast' || state === 'reamed'
        ? `A surface test needs a shaved blank; this one is ${blankStateLabels[state].toLowerCase()}. Shave it first.`
        : `${finished(state)}: its surface is no longer tested in the register.`
    case 'testCut':
      if (state === 'cast' || state === 'reamed') return `A test cut needs a shaved surface; this blank is ${blankStateLabels[state].toLowerCase()}. Shave it first.`
      if (state === 'reserved') {
        return holder
          ? `It is reserved for ticket #${holder.ticketId} (order ${holder.orderNumber}): its surface is kept for the customer's cylinder.`
          : 'It is reserved for a ticket: its surface is kept for the customer\'s cylinder.'
      }
      return `${finished(state)}: its current surface already carries a cut. Reshave it for a fresh surface first.`
    case 'reshave':
      return state === 'cast' || state === 'reamed'
        ? 'There is no surface to reshave yet: record a shaving pass.'
        : `${finished(state)}: its surface can no longer be reshaved.`
    default:
      return `A blank that is ${blankStateLabels[state].toLowerCase()} cannot be ${action === 'scrap' ? 'scrapped' : `moved by “${action}”`}.`
  }
}

/** The state after a surface test: what the maker finally decided. */
export function blankStateAfterTest(finalVerdict: 'pass' | 'fail'): BlankState {
  return finalVerdict === 'pass' ? 'tested_pass' : 'tested_fail'
}

/** Codes `GW-<yy>-<nnnn>`, drawn from a per-year counter (four digits at least). */
export const blankCodePattern = /^GW-\d{2}-\d{4,6}$/

export function formatBlankCode(year: number, sequence: number): string {
  return `GW-${String(year % 100).padStart(2, '0')}-${String(sequence).padStart(4, '0')}`
}

/** The surface the blank carries now: surfaces used + 1. */
export function blankCurrentSurface(surfacesUsed: number): number {
  return surfacesUsed + 1
}

/**
 * What the wall still allows: the diameter above the shop's floor and the fresh surfaces it holds,
 * each costing `depthPerSurfaceIn` on the radius (twice that on the diameter).
 */
export function blankSurfacesLeft(diameterIn: number | null, minimumDiameterIn: number, depthPerSurfaceIn: number): { diameterLeftIn: number | null, surfacesLeft: number | null } {
  if (diameterIn === null) return { diameterLeftIn: null, surfacesLeft: null }
  const diameterLeftIn = diameterIn - minimumDiameterIn
  return { diameterLeftIn, surfacesLeft: Math.max(0, Math.floor(diameterLeftIn / (2 * depthPerSurfaceIn) + 1e-6)) }
}

/** The verdict a surface keeps unless the maker overrules: marginal is still a pass. */
export function surfaceVerdictWithoutOverrule(computed: 'pass' | 'marginal' | 'fail'): 'pass' | 'fail' {
  return computed === 'fail' ? 'fail' : 'pass'
}

export function isSurfaceOverrule(computed: 'pass' | 'marginal' | 'fail', finalVerdict: 'pass' | 'fail'): boolean {
  return surfaceVerdictWithoutOverrule(computed) !== finalVerdict
}
