// The catalogue page reads its filters without zod (shared/utils/shopDisplay.ts) so its bundle stays small;
// it must read every address exactly as the server's schema does. Common practice, no source: the schema is the reference.
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { catalogueQuerySchema } from '../../shared/utils/catalogueQuery'
import { catalogueQueryFrom } from '../../shared/utils/shopDisplay'

const bySchema = (raw: Record<string, unknown>) => {
  const parsed = catalogueQuerySchema.safeParse(raw)
  return parsed.success ? parsed.data : catalogueQuerySchema.parse({})
}

describe('catalogueQueryFrom reads a query as catalogueQuerySchema does', () => {
  it('on chosen addresses', () => {
    const cases: Record<string, unknown>[] = [
      {}, { kind: 'blank' }, { kind: 'wax' }, { format: 'four_minute', sort: 'newest', page: '3' }, { page: '0' }, { page: '' },
      { page: '2.5' }, { page: '1001' }, { page: ' 7 ' }, { q: '  brass band  ' }, { q: 'x'.repeat(101) }, { q: '' }, { sort: 'price' },
    ]
    for (const raw of cases) expect(catalogueQueryFrom(raw), JSON.stringify(raw)).toEqual(bySchema(raw))
  })

  it('on generated addresses', () => {
    const field = (values: string[]) => fc.option(fc.oneof(fc.constantFrom(...values), fc.string({ maxLength: 6 })), { nil: undefined })
    fc.assert(fc.property(fc.record({
      kind: field(['blank', 'recorded']),
      format: field(['two_minute', 'four_minute']),
      sort: field(['title', 'price_asc', 'price_desc', 'newest']),
      page: field(['1', '2', '1000', '1001', '0', '-1', '3.5', '']),
      q: fc.option(fc.string({ maxLength: 120 }), { nil: undefined }),
    }, { requiredKeys: [] }), (raw) => {
      const present = Object.fromEntries(Object.entries(raw).filter(([, v]) => v !== undefined))
      expect(catalogueQueryFrom(present)).toEqual(bySchema(present))
    }), { numRuns: 2000 })
  })
})
