import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { productFields, productSlugFrom, productSlugPattern } from '../../shared/utils/catalogueSchemas'

// The slug rule is the shop's own (common practice, no source): lower-case letters and digits, single hyphens.

describe('the shop address a title suggests', () => {
  it('folds accents, spells "&" and joins words with single hyphens', () => {
    expect(productSlugFrom('Whistling Study No. 3')).toBe('whistling-study-no-3')
    expect(productSlugFrom('Café & Wax — Ærø')).toBe('cafe-and-wax-aero')
    expect(productSlugFrom('  --Tallow-Yard  Two Step--  ')).toBe('tallow-yard-two-step')
    expect(productSlugFrom('☕')).toBe('')
  })

  it('is always a slug the product schema takes, or empty, for any title', () => {
    const slug = productFields.shape.slug
    fc.assert(fc.property(fc.string({ maxLength: 200, unit: 'grapheme' }), (title) => {
      const suggested = productSlugFrom(title)
      expect(suggested.length).toBeLessThanOrEqual(80)
      if (suggested === '') return
      expect(suggested).toMatch(productSlugPattern)
      if (suggested.length >= 3) expect(slug.safeParse(suggested).success).toBe(true)
    }), { numRuns: 500 })
  })
})
