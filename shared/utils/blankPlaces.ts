import type { BlankState } from './blankLifecycle'

/*
 * Where a blank usually is in each state of its life: the register moves it there when it changes state,
 * unless the move names a place of its own. A place the maker types on the blank stays until its next
 * change of state. Common practice of a small workshop, no source; the words are the shop's own.
 */
export const blankUsualPlaces: Record<BlankState, string> = {
  cast: 'curing rack',
  reamed: 'bench',
  shaved: 'bench',
  tested_pass: 'ready shelf',
  tested_fail: 'reshave tray',
  reserved: 'recording shelf',
  cut: 'finished shelf',
  shipped: '',
  scrapped: 'scrap bin',
}

/** The place a blank held for an order being packed waits at until the parcel leaves. */
export const blankPackingPlace = 'packing table'

/**
 * The blank's location after a change: the one the change gives, else (on a change of state) the usual
 * place of the new state, else the one it had.
 */
export function blankLocationAfter(current: { state: BlankState, location: string }, change: { state?: BlankState, location?: string }): string {
  if (change.location !== undefined) return change.location
  if (change.state !== undefined && change.state !== current.state) return blankUsualPlaces[change.state]
  return current.location
}
