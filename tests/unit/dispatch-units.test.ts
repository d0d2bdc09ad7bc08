import { describe, expect, it } from 'vitest'
import { packingChecklist } from '../../shared/utils/dispatchSchemas'
import { formatCushioning } from '../../shared/utils/packing'

/*
 * The packing checklist in the shop's length unit. Carrier packing guidance asks for at least 2 in of
 * cushioning on every side, given in metric guidance as 5 cm; 1 in = 25.4 mm exactly (NIST SP 811 B.8).
 */

describe('cushioning in the shop\'s length unit', () => {
  it('2 in reads 2 in (50 mm) in an inch shop and 50 mm (2 in) in a millimetre shop', () => {
    expect(formatCushioning(2, { length: 'in', locale: 'en-US' })).toBe('2 in (50 mm)')
    expect(formatCushioning(2, { length: 'mm', locale: 'en-GB' })).toBe('50 mm (2 in)')
    // 3 in = 76.2 mm, to the nearest 5 mm: 75.
    expect(formatCushioning(3, { length: 'mm', locale: 'en-GB' })).toBe('75 mm (3 in)')
  })

  it('the checklist line follows the shop\'s unit; without one it reads inches first', () => {
    const line = (prefs?: { length: 'in' | 'mm', locale: string }) => packingChecklist({ cushioningIn: 2, doubleBox: true }, prefs).find(item => item.id === 'cushioning')!.label
    expect(line({ length: 'mm', locale: 'en-GB' })).toBe('At least 50 mm (2 in) of cushioning on every side')
    expect(line({ length: 'in', locale: 'en-US' })).toBe('At least 2 in (50 mm) of cushioning on every side')
    expect(line()).toBe('At least 2 in (50 mm) of cushioning on every side')
  })
})
