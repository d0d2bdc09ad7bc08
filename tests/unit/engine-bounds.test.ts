import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { lengthBounds, PLAN_STEPS_MAX } from '../../shared/utils/bounds'
import { engineSettingsSchema } from '../../shared/utils/engineSettings'
import { LENGTH_SANITY_LIMIT_IN, lengthField, parseLength } from '../../shared/utils/length'
import { reamingPlan } from '../../shared/utils/reaming'
import { shavingPlan } from '../../shared/utils/shaving'
import { blankReamingSchema, blankShavingSchema } from '../../shared/utils/workshopSchemas'

// The bounds are a shop's guard against slips (common practice, no source); the blank's size they
// are set around is about 4 3/16 in long and 2.19 in across (1890s phonograph user guide, public domain).

const issuesOf = (result: { success: boolean, error?: z.ZodError }) => Object.fromEntries((result.error?.issues ?? []).map(issue => [issue.path.join('.'), issue.message]))

describe('length fields have trade bounds and say them', () => {
  it('a diameter past 6 in is refused with the bound in inches and millimetres', () => {
    const field = z.object({ diameterIn: lengthField('diameterIn', { positive: true, ...lengthBounds.diameterIn }) })
    expect(field.parse({ diameterIn: '2 3/16' }).diameterIn).toBeCloseTo(2.1875, 10)
    expect(issuesOf(field.safeParse({ diameterIn: 1e9 })).diameterIn).toBe('diameterIn must be at most 6 in (152.4 mm): check the figure')
    expect(issuesOf(field.safeParse({ diameterIn: '160 mm' })).diameterIn).toMatch(/at most 6 in/)
  })

  it('signed readings are bounded on both sides', () => {
    const field = z.object({ overhang: lengthField('overhang', { allowNegative: true, ...lengthBounds.overhangIn }) })
    expect(field.parse({ overhang: '-1/2' }).overhang).toBe(-0.5)
    expect(issuesOf(field.safeParse({ overhang: -1e308 })).overhang).toMatch(/at least -4 in/)
    expect(issuesOf(field.safeParse({ overhang: 4.5 })).overhang).toMatch(/at most 4 in/)
  })

  it('a field with no bound of its own still refuses more than the sanity limit', () => {
    const field = z.object({ length: lengthField('length') })
    expect(issuesOf(field.safeParse({ length: LENGTH_SANITY_LIMIT_IN + 1 })).length).toMatch(/at most 48 in/)
  })

  it('never throws on any number or text, however large', () => {
    expect(parseLength(1e308)).toBe(1e308)
    const field = z.object({ x: lengthField('x', { allowNegative: true }) })
    fc.assert(fc.property(fc.oneof(fc.double(), fc.string(), fc.stringMatching(/^\d{1,400}(\/\d{1,400})?$/)), (value) => {
      const result = field.safeParse({ x: value })
      if (result.success) expect(Math.abs(result.data.x)).toBeLessThanOrEqual(LENGTH_SANITY_LIMIT_IN)
    }), { numRuns: 3000 })
  })

  it('a long text is refused before it is read as a number', () => {
    const field = z.object({ x: lengthField('x') })
    expect(issuesOf(field.safeParse({ x: '1'.repeat(10_000) })).x).toMatch(/at most 40 characters/)
  })

  it('the reaming and shaving logs refuse the inputs that once exhausted the server', () => {
    expect(issuesOf(blankReamingSchema.safeParse({ overhangBeforeIn: -1e308, overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 72 }))).toHaveProperty('overhangBeforeIn')
    for (const diameterBeforeIn of [2147483648, 1e308, 2 ** 53 + 2, '99999999999999999999999']) {
      expect(issuesOf(blankShavingSchema.safeParse({ diameterBeforeIn, lowDiameterIn: 2.19, diameterAfterIn: 2.19 }))).toHaveProperty('diameterBeforeIn')
    }
  })
})

describe('engine plans are bounded by construction', () => {
  it(`a reaming plan of more than ${PLAN_STEPS_MAX} reamings is an answer with no steps`, () => {
    // Unreachable through the schemas; a stored figure from before the bounds could still ask it.
    const plan = reamingPlan({ overhangIn: -1e308 })
    expect(plan.status).toBe('check_figures')
    expect(plan.steps).toEqual([])
    expect(plan.warnings[0]).toMatch(/More than 200 reamings/)
    // Exactly at the limit the steps are still listed: 200 reamings of 1/16 in from 7/16 − 12.5 in.
    const longest = reamingPlan({ overhangIn: 7 / 16 - 200 / 16 })
    expect(longest.status).toBe('plan')
    expect(longest.reamings).toBe(200)
    expect(longest.steps).toHaveLength(50)
  })

  it(`a shaving plan of more than ${PLAN_STEPS_MAX} passes lists none and says so`, () => {
    const plan = shavingPlan({ highDiameterIn: 1e9, lowDiameterIn: 2.19 })
    expect(plan.steps).toEqual([])
    expect(plan.warnings[0]).toMatch(/More than 200 passes/)
    const ordinary = shavingPlan({ highDiameterIn: 2.2, lowDiameterIn: 2.188 })
    expect(ordinary.steps).toHaveLength(2)
  })
})

describe('the engine settings have upper bounds', () => {
  it('refuses slips in lengths, money, temperatures, weights and list sizes, naming each', () => {
    const issues = issuesOf(engineSettingsSchema.safeParse({
      reaming: { perReamingIn: 1e-9 },
      shaving: { minimumDiameterIn: 1e9 },
      standardRpm: 1e6,
      heat: { cautionHighC: 1e6, holdHighC: 1e7 },
      packing: { cylinderWeightG: 1e12, boxes: Array.from({ length: 51 }, (_, i) => ({ id: `b${i}`, label: 'b', inside: { lengthIn: 6, widthIn: 4, heightIn: 4 }, wallIn: 0.2, weightG: 70 })) },
      prices: { blankMinor: { two_minute: 1e15 } },
    }))
    expect(Object.keys(issues)).toEqual(expect.arrayContaining([
      'reaming.perReamingIn', 'shaving.minimumDiameterIn', 'standardRpm', 'heat.cautionHighC', 'heat.holdHighC',
      'packing.cylinderWeightG', 'packing.boxes', 'prices.blankMinor.two_minute',
    ]))
    expect(engineSettingsSchema.safeParse({}).success).toBe(true)
  })
})
