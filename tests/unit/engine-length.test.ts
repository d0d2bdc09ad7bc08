import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import {
  LengthParseError,
  formatInchFraction,
  formatInches,
  formatLengthLabel,
  inchesToMillimetres,
  lengthField,
  parseLength,
} from '../../shared/utils/length'

describe('parseLength', () => {
  // NIST: 1 in = 25.4 mm exactly
  it('reads 1 3/16 as 1.1875 in = 30.1625 mm (NIST: 1 in = 25.4 mm exactly)', () => {
    expect(parseLength('1 3/16')).toBe(1 + 3 / 16)
    expect(parseLength('1 3/16')).toBe(1.1875)
    expect(inchesToMillimetres(parseLength('1 3/16'))).toBeCloseTo(30.1625, 10)
  })

  it.each([
    ['7/16', 7 / 16],
    ['1-3/16', 19 / 16],
    ['1 - 3/16', 19 / 16],
    ['0.4375', 7 / 16],
    ['.4375', 7 / 16],
    ['2.187"', 2.187],
    ['2.187 in', 2.187],
    ['2 3/16 inches', 35 / 16],
    [' 3 ', 3],
    ['+1/2', 0.5],
  ])('reads %j as inches', (typed, inches) => {
    expect(parseLength(typed)).toBeCloseTo(inches, 12)
  })

  // NIST: 1 in = 25.4 mm exactly
  it('reads millimetres and centimetres (NIST: 1 in = 25.4 mm exactly)', () => {
    expect(parseLength('25.4 mm')).toBe(1)
    expect(parseLength('11.1mm')).toBeCloseTo(11.1 / 25.4, 12)
    expect(parseLength('2.54 cm')).toBe(1)
  })

  it('keeps fractions exact where binary decimals would not', () => {
    // 1/3 in typed as a fraction must be the nearest double to 1/3, not a sum of rounded parts
    expect(parseLength('1 1/3')).toBe(4 / 3)
  })

  it('rejects negative lengths unless asked, and accepts them when asked', () => {
    expect(() => parseLength('-1/16')).toThrow(/"-1\/16" is not a length: a length cannot be negative/)
    expect(() => parseLength(-0.5)).toThrow(LengthParseError)
    expect(parseLength('-1/16', { allowNegative: true })).toBe(-1 / 16)
  })

  it.each([
    ['7/0', /"7\/0" is not a length: division by zero/],
    ['1 3/0', /"1 3\/0" is not a length: division by zero/],
    ['abc', /"abc" is not a length: expected inches like 7\/16/],
    ['', /"" is not a length: nothing was typed/],
    ['1/2/3', /"1\/2\/3" is not a length/],
    ['3 ft', /"3 ft" is not a length: unknown unit "ft"/],
    ['1 17/16', /"1 17\/16" is not a length: the fraction in a mixed number must be less than 1/],
  ])('throws a LengthParseError naming %j', (typed, message) => {
    expect(() => parseLength(typed)).toThrow(LengthParseError)
    expect(() => parseLength(typed)).toThrow(message)
  })
})

describe('formatting inches', () => {
  it('gives three decimal places', () => {
    expect(formatInches(1 + 3 / 16)).toBe('1.188')
  })

  it.each([
    [0, '0'],
    [7 / 16, '7/16'],
    [1 + 3 / 16, '1 3/16'],
    [2 + 3 / 16, '2 3/16'],
    [2, '2'],
    [2.19, '2 3/16'], // nearest 1/64 of 2.19 is 140/64 = 2 3/16
  ])('reads %d in as %j', (inches, text) => {
    expect(formatInchFraction(inches)).toBe(text)
  })

  it('labels a length with the rule fraction and millimetres beside (NIST: 1 in = 25.4 mm exactly)', () => {
    expect(formatLengthLabel(1.1875)).toBe(`1.188 in (1 3/16 in) · ${(1.1875 * 25.4).toFixed(2)} mm`)
    expect(formatLengthLabel(2.19)).toMatch(/^2\.190 in \(≈ 2 3\/16 in\) · 55\.63 mm$/)
  })

  it('parses back every 1/64 in step up to 5 in exactly (exhaustive)', () => {
    for (let sixtyFourths = 0; sixtyFourths <= 5 * 64; sixtyFourths++) {
      const inches = sixtyFourths / 64
      expect(parseLength(formatInchFraction(inches))).toBe(inches)
    }
  })

  it('parses back the fraction of any length to within 1/128 in (property)', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 5, noNaN: true }), (inches) => {
      expect(Math.abs(parseLength(formatInchFraction(inches)) - inches)).toBeLessThanOrEqual(1 / 128 + 1e-12)
    }))
  })
})

describe('lengthField', () => {
  const schema = z.object({ overhang: lengthField('overhang'), diameter: lengthField('diameter', { positive: true }) })

  it('turns typed fractions and numbers into inches', () => {
    expect(schema.parse({ overhang: '3/16', diameter: 2.19 })).toEqual({ overhang: 3 / 16, diameter: 2.19 })
  })

  it('names the field and the input in its issues', () => {
    const result = schema.safeParse({ overhang: '7/0', diameter: '0' })
    expect(result.success).toBe(false)
    const issues = result.error?.issues ?? []
    expect(issues.find(issue => issue.path[0] === 'overhang')?.message).toBe('overhang: "7/0" is not a length: division by zero')
    expect(issues.find(issue => issue.path[0] === 'diameter')?.message).toBe('diameter must be more than 0 in')
  })

  it('says which field is missing', () => {
    const result = schema.safeParse({ diameter: '2.19' })
    expect(result.error?.issues[0]?.message).toBe('overhang is required')
  })
})
