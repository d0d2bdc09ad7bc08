import { describe, expect, it } from 'vitest'
import { blankActionRefusal, blankStates, type BlankState } from '../../shared/utils/blankLifecycle'
import { DB_ID_MAX, idField } from '../../shared/utils/ids'

// The life-cycle table is our own rule set (the states named in shared/utils/blankLifecycle.ts); these checks pin the rows
// issue 6 added: a test cut uses a fresh surface, and a reshave gives a cut blank a new one.

describe('the testCut row of the blank life cycle', () => {
  const allowed = (state: BlankState, holder = null as { ticketId: number, orderNumber: string } | null) => blankActionRefusal('testCut', state, holder) === null

  it('takes only a shaved or tested surface that no open ticket holds', () => {
    expect(blankStates.filter(state => allowed(state))).toEqual(['shaved', 'tested_pass', 'tested_fail'])
    expect(allowed('tested_pass', { ticketId: 7, orderNumber: 'GW26-01007' })).toBe(false)
  })

  it('names the state, or the ticket that holds the blank, in each refusal', () => {
    expect(blankActionRefusal('testCut', 'reserved', { ticketId: 7, orderNumber: 'GW26-01007' })).toMatch(/reserved for ticket #7 \(order GW26-01007\)/)
    expect(blankActionRefusal('testCut', 'cut')).toMatch(/^It is cut: .*already carries a cut/)
    expect(blankActionRefusal('testCut', 'reamed')).toMatch(/this blank is reamed/)
    expect(blankActionRefusal('testCut', 'shipped')).toMatch(/shipped/)
    expect(blankActionRefusal('testCut', 'scrapped')).toMatch(/scrapped/)
  })

  it('a blank carrying a cut no ticket holds may be reshaved; one a ticket holds may not', () => {
    expect(blankActionRefusal('reshave', 'cut')).toBeNull()
    expect(blankActionRefusal('reshave', 'cut', { ticketId: 3, orderNumber: 'GW26-01003' })).toMatch(/Ticket #3/)
    expect(blankActionRefusal('reshave', 'reserved')).not.toBeNull()
  })
})

describe('idField: ids within a PostgreSQL integer', () => {
  const schema = idField('id', 'choose one')
  const message = (input: unknown) => {
    const parsed = schema.safeParse(input)
    return parsed.success ? null : parsed.error.issues[0]!.message
  }

  it('accepts 1 to 2,147,483,647 as text or number (the integer type\'s range, PostgreSQL manual)', () => {
    expect(DB_ID_MAX).toBe(2 ** 31 - 1)
    expect(schema.parse('1')).toBe(1)
    expect(schema.parse(' 42 ')).toBe(42)
    expect(schema.parse(DB_ID_MAX)).toBe(DB_ID_MAX)
    expect(schema.parse(String(DB_ID_MAX))).toBe(DB_ID_MAX)
  })

  it('refuses what names no row, with a message naming the field', () => {
    expect(message('3000000000')).toBe('id must be at most 2147483647: no record has a larger id')
    expect(message(DB_ID_MAX + 1)).toMatch(/at most/)
    expect(message('0')).toBe('id must be 1 or more')
    expect(message('-5')).toBe('id must be 1 or more')
    expect(message('1.5')).toMatch(/whole number/)
    expect(message('1e3')).toMatch(/whole number/)
    expect(message('abc')).toMatch(/whole number/)
    expect(message('')).toBe('choose one')
    expect(message(undefined)).toBe('choose one')
    expect(message(true)).toBe('id must be a number')
  })
})
