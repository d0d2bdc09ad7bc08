import { describe, expect, it } from 'vitest'
import { blankStates } from '../../shared/utils/blankLifecycle'
import { blankLocationAfter, blankUsualPlaces } from '../../shared/utils/blankPlaces'

// The places are the shop's own words for a small workshop's benches and shelves: common practice, no source.
describe('a blank\'s location follows its state', () => {
  it('names a usual place for every state, and none for a blank that has left the workshop', () => {
    for (const state of blankStates) expect(typeof blankUsualPlaces[state]).toBe('string')
    expect(blankUsualPlaces.shipped).toBe('')
    expect(blankUsualPlaces.tested_pass).toBe('ready shelf')
  })

  it('a change of state takes the blank to the new state\'s usual place', () => {
    expect(blankLocationAfter({ state: 'cast', location: 'curing rack' }, { state: 'reamed' })).toBe('bench')
    expect(blankLocationAfter({ state: 'shaved', location: 'Drawer 3' }, { state: 'tested_pass' })).toBe('ready shelf')
    expect(blankLocationAfter({ state: 'reserved', location: 'packing table' }, { state: 'shipped' })).toBe('')
  })

  it('a place the maker types stays until the next change of state', () => {
    expect(blankLocationAfter({ state: 'reamed', location: 'bench' }, { location: 'Drawer 3' })).toBe('Drawer 3')
    // A change that keeps the state (a second reaming, a test that passes again) leaves the typed place alone.
    expect(blankLocationAfter({ state: 'reamed', location: 'Drawer 3' }, { state: 'reamed' })).toBe('Drawer 3')
    expect(blankLocationAfter({ state: 'tested_pass', location: 'Drawer 3' }, {})).toBe('Drawer 3')
    // A move that names its own place goes there.
    expect(blankLocationAfter({ state: 'tested_pass', location: 'ready shelf' }, { state: 'reserved', location: 'packing table' })).toBe('packing table')
  })
})
