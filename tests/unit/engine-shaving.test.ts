import { describe, expect, it } from 'vitest'
import { defaultEngineSettings } from '../../shared/utils/engineSettings'
import { infeedPerPassIn, shavingPlan, wheelDegreesForInfeed } from '../../shared/utils/shaving'

describe('in-feed wheel (common practice, no source)', () => {
  it('45° of the wheel feeds the cutter 0.003 in (common practice, no source)', () => {
    expect(infeedPerPassIn(45)).toBeCloseTo(0.003, 12)
  })

  it('a full turn (360°) feeds 0.024 in (common practice, no source; arithmetic)', () => {
    expect(infeedPerPassIn(360)).toBeCloseTo(0.024, 12)
    expect(wheelDegreesForInfeed(0.024)).toBeCloseTo(360, 9)
  })

  it('refuses a wheel turned by nothing', () => {
    expect(() => infeedPerPassIn(0)).toThrow(RangeError)
  })
})

describe('shavingPlan', () => {
  it('cleans up a 0.006 in out-of-round blank in one 45° pass', () => {
    const plan = shavingPlan({ highDiameterIn: 2.2, lowDiameterIn: 2.194, wheelDegrees: 45, minimumDiameterIn: 2.1, perSurfaceIn: 0.003 })
    expect(plan.depthToCleanUpIn).toBeCloseTo((2.2 - 2.194) / 2, 12)
    expect(plan.infeedIn).toBeCloseTo(0.003, 12)
    expect(plan.passes).toBe(1)
    // diameter falls by twice the radial cut
    expect(plan.diameterAfterIn).toBeCloseTo(2.2 - 2 * 0.003, 12)
    // (2.194 − 2.100) ÷ (2 × 0.003) = 15.67 → 15 surfaces
    expect(plan.surfacesLeft).toBe(Math.floor((2.194 - 2.1) / 0.006))
    expect(plan.warnings).toEqual([])
  })

  it('counts passes as the ceiling of depth ÷ in-feed, with the diameter after each', () => {
    const plan = shavingPlan({ highDiameterIn: 2.2, lowDiameterIn: 2.185, wheelDegrees: 22.5 })
    const infeed = 0.0015
    const passes = Math.ceil(0.0075 / infeed)
    expect(plan.passes).toBe(passes)
    expect(plan.steps).toHaveLength(passes)
    plan.steps.forEach((step, index) => expect(step.diameterIn).toBeCloseTo(2.2 - 2 * (index + 1) * infeed, 12))
    expect(plan.diameterAfterIn).toBeCloseTo(2.2 - 2 * passes * infeed, 12)
  })

  it('takes a given depth to clean up instead of two readings, and always at least one pass', () => {
    expect(shavingPlan({ highDiameterIn: 2.19, depthToCleanUpIn: 0.009 }).passes).toBe(3)
    expect(shavingPlan({ highDiameterIn: 2.19, lowDiameterIn: 2.19 }).passes).toBe(1)
  })

  it('warns when the in-feed per pass is deeper than about 0.003 in on the radius (collectors\' forum practice)', () => {
    expect(defaultEngineSettings.shaving.maxCutPerPassIn).toBe(0.003)
    const plan = shavingPlan({ highDiameterIn: 2.2, lowDiameterIn: 2.18, wheelDegrees: 90 })
    expect(plan.infeedIn).toBeCloseTo(0.006, 12)
    expect(plan.warnings.some(warning => /deeper than the 0\.0030 in on the radius.*no more than 45°/.test(warning))).toBe(true)
  })

  it('warns when one pass cuts deeper than needed to clean up', () => {
    const plan = shavingPlan({ highDiameterIn: 2.2, lowDiameterIn: 2.198, wheelDegrees: 45 })
    expect(plan.warnings.some(warning => /deeper than the 0\.0010 in needed.*15° of wheel/.test(warning))).toBe(true)
  })

  it('warns when the plan goes under the shop\'s minimum diameter, and leaves no surfaces', () => {
    const plan = shavingPlan({ highDiameterIn: 2.104, lowDiameterIn: 2.098, minimumDiameterIn: 2.1 })
    expect(plan.diameterAfterIn).toBeLessThan(2.1)
    expect(plan.surfacesLeft).toBe(0)
    expect(plan.warnings.some(warning => /under the shop's minimum diameter of 2\.100 in/.test(warning))).toBe(true)
  })

  it('needs the low reading or a depth, and a low reading not above the high one', () => {
    expect(() => shavingPlan({ highDiameterIn: 2.19 })).toThrow(/smallest diameter/)
    expect(() => shavingPlan({ highDiameterIn: 2.19, lowDiameterIn: 2.2 })).toThrow(/at least the low/)
  })
})
