import { describe, expect, it } from 'vitest'
import { addressAsLines, addressOneLine, addressTownLine } from '../../shared/utils/addressPlace'

// How an address is written out: postal code before the town, the region after a comma (common US
// practice for a label's town line, no source); an empty part leaves neither a space nor a comma behind.
describe('an address written out', () => {
  const full = { name: 'Iris Quillfeather', line1: '4 Lantern Row', line2: '', city: 'Lowmere', region: 'CA', postalCode: '90210', country: 'US' }

  it('writes the town line as "90210 Lowmere, CA"', () => {
    expect(addressTownLine(full)).toBe('90210 Lowmere, CA')
  })

  it('leaves out an empty part with its space or comma', () => {
    expect(addressTownLine({ ...full, region: '' })).toBe('90210 Lowmere')
    expect(addressTownLine({ ...full, region: null })).toBe('90210 Lowmere')
    expect(addressTownLine({ ...full, postalCode: '' })).toBe('Lowmere, CA')
    expect(addressTownLine({ ...full, postalCode: '   ' })).toBe('Lowmere, CA')
    expect(addressTownLine({ ...full, city: '' })).toBe('90210, CA')
    expect(addressTownLine({ city: '', region: '', postalCode: '' })).toBe('')
  })

  it('trims what was typed around each part', () => {
    expect(addressTownLine({ ...full, postalCode: ' 90210 ', city: ' Lowmere ', region: ' CA ' })).toBe('90210 Lowmere, CA')
  })

  it('gives the lines top to bottom with the country by name, skipping an empty second street line', () => {
    expect(addressAsLines(full)).toEqual(['Iris Quillfeather', '4 Lantern Row', '90210 Lowmere, CA', 'United States'])
    expect(addressAsLines({ ...full, line2: 'Flat 2' })[2]).toBe('Flat 2')
  })

  it('writes the whole address on one line with single commas', () => {
    expect(addressOneLine(full)).toBe('Iris Quillfeather, 4 Lantern Row, 90210 Lowmere, CA, United States')
    expect(addressOneLine({ ...full, postalCode: '', region: '' })).toBe('Iris Quillfeather, 4 Lantern Row, Lowmere, United States')
    expect(addressOneLine({ ...full, postalCode: '', region: '' })).not.toMatch(/\s{2}|, ,|\s,/)
  })
})
