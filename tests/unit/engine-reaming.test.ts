import { describe, expect, it } from 'vitest'
import { defaultEngineSettings } from '../../shared/utils/engineSettings'
import { parseLength } from '../../shared/utils/length'
import { reamingPlan, reamingsForTravel } from '../../shared/utils/reaming'

describe('reamingPlan (common practice, no source)', () => {
  it('15/16 in still to go at 1/16 in per reaming is 15 reamings (common practice, no source)', () => {
    expect(reamingsForTravel(parseLength('15/16'), parseLength('1/16'))).toBe(15)
    const plan = reamingPlan({ overhangIn: 0, targetIn: parseLength('15/16'), perReamingIn: parseLength('1/16'), setSize: 4 })
    expect(plan.reamings).toBe(15)
    expect(plan.sets).toBe(4)
    // sets of four; the last set is partial
    expect(plan.steps.map(step => step.afterReamings)).toEqual([4, 8, 12, 15])
    expect(plan.steps.at(-1)?.overhangIn).toBe(15 / 16)
  })

  it('3/16 in showing when 7/16 in is wanted is 4 more reamings, one set (common practice, no source)', () => {
    const plan = reamingPlan({ overhangIn: parseLength('3/16'), targetIn: parseLength('7/16'), perReamingIn: 1 / 16, setSize: 4 })
    expect(plan.travelIn).toBe(4 / 16)
    expect(plan.reamings).toBe(4)
    expect(plan.sets).toBe(1)
    expect(plan.steps).toEqual([{ set: 1, afterReamings: 4, overhangIn: 7 / 16 }])
    expect(plan.warnings.join(' ')).toMatch(/over-reaming cannot be undone/i)
  })

  it('takes the target, travel per reaming and set size from the settings (finished overhang about 7/16 in)', () => {
    expect(defaultEngineSettings.reaming).toMatchObject({ perReamingIn: 1 / 16, setSize: 4, targetOverhangIn: 7 / 16 })
    expect(reamingPlan({ overhangIn: 3 / 16 }).reamings).toBe(4)
  })

  it('expects a reading after each set that never passes the wanted fit', () => {
    const plan = reamingPlan({ overhangIn: 0.1, targetIn: 0.4375, perReamingIn: 0.0625, setSize: 2 })
    // 0.3375 in to go: 5.4 reamings, so 6, with a light last one
    expect(plan.reamings).toBe(Math.ceil(0.3375 / 0.0625))
    expect(plan.steps.map(step => step.afterReamings)).toEqual([2, 4, 6])
    expect(plan.steps.map(step => step.overhangIn)).toEqual([0.1 + 2 * 0.0625, 0.1 + 4 * 0.0625, 0.4375])
    for (const step of plan.steps) expect(step.overhangIn).toBeLessThanOrEqual(plan.targetIn)
    expect(plan.warnings.some(warning => /last reaming needs only about 0\.025 in/.test(warning))).toBe(true)
  })

  it('already at the wanted fit: 0 reamings and a warning', () => {
    const plan = reamingPlan({ overhangIn: 7 / 16, targetIn: 7 / 16 })
    expect(plan.status).toBe('at_fit')
    expect(plan.reamings).toBe(0)
    expect(plan.sets).toBe(0)
    expect(plan.steps).toEqual([])
    expect(plan.warnings[0]).toMatch(/already at the wanted fit/)
  })

  it('past the wanted fit: refuses, with the over-reaming warning', () => {
    const plan = reamingPlan({ overhangIn: 8 / 16, targetIn: 7 / 16 })
    expect(plan.status).toBe('past_fit')
    expect(plan.reamings).toBe(0)
    expect(plan.warnings[0]).toMatch(/0\.063 in \(1\/16 in\).* past the wanted fit.*cannot be undone/)
  })

  it('warns when the reading was taken away from the reference fit temperature (about 75 °F, common practice, no source)', () => {
    const warm = reamingPlan({ overhangIn: 3 / 16, benchTemperatureF: 95 })
    expect(warm.warnings.some(warning => /75 °F.*95 °F.*further along the mandrel/.test(warning))).toBe(true)
    const cold = reamingPlan({ overhangIn: 3 / 16, benchTemperatureF: 60 })
    expect(cold.warnings.some(warning => /would over-ream/.test(warning))).toBe(true)
    expect(reamingPlan({ overhangIn: 3 / 16, benchTemperatureF: 76 }).warnings.some(warning => /°F/.test(warning))).toBe(false)
  })

  it('rejects a travel per reaming of zero and a fractional set size', () => {
    expect(() => reamingPlan({ overhangIn: 0, perReamingIn: 0 })).toThrow(RangeError)
    expect(() => reamingPlan({ overhangIn: 0, setSize: 2.5 })).toThrow(RangeError)
  })
})
