import { describe, expect, it } from 'vitest'
import { incompleteCoverageReason, surfaceCoverage, surfaceThresholdsSchema } from '../../server/audio/verdict'
import { cylinderFormatTable, playingTimeMinutes } from '../../shared/utils/cylinder'

describe('a surface test covers the surface', () => {
  // Playing time = recorded length × grooves per inch ÷ rpm (shared/utils/cylinder.ts; the format table's
  // 3.8 in × 200 ÷ 160 rpm = 4.75 min, the archives' playing time of a 4-minute cylinder).
  const fourMinuteS = playingTimeMinutes(cylinderFormatTable.four_minute.defaultRecordableLengthIn, cylinderFormatTable.four_minute.groovesPerInch, 160) * 60

  it('a 20 s take covers 7 % of a 4-minute surface at 160 rpm, far under the shop\'s 90 %', () => {
    expect(fourMinuteS).toBeCloseTo(285, 9)
    const coverage = surfaceCoverage(20, fourMinuteS, 90)
    expect(coverage.complete).toBe(false)
    expect(coverage.percent).toBeCloseTo(7.02, 2)
    expect(incompleteCoverageReason(coverage)).toBe('20 s covers 7 % of the 4 min 45 s surface (at least 90 % is needed); play it through to the end.')
  })

  it('the limit is inclusive, a longer take counts as 100 %, and the wording rounds a 3 min 40 s surface as the maker reads it', () => {
    expect(surfaceCoverage(0.9 * fourMinuteS, fourMinuteS, 90).complete).toBe(true)
    expect(surfaceCoverage(0.89 * fourMinuteS, fourMinuteS, 90).complete).toBe(false)
    expect(surfaceCoverage(2 * fourMinuteS, fourMinuteS, 90).percent).toBe(100)
    expect(incompleteCoverageReason(surfaceCoverage(20, 220, 90))).toMatch(/^20 s covers 9 % of the 3 min 40 s surface/)
  })

  it('the shop\'s figures default to 90 % coverage and a pass good for 90 days, and refuse nonsense naming the field', () => {
    const defaults = surfaceThresholdsSchema.parse({})
    expect([defaults.coveragePercent, defaults.passMaxAgeDays]).toEqual([90, 90])
    const bad = surfaceThresholdsSchema.safeParse({ coveragePercent: 120, passMaxAgeDays: 1.5 })
    expect(bad.success).toBe(false)
    expect(bad.error!.issues.map(issue => issue.path.join('.')).sort()).toEqual(['coveragePercent', 'passMaxAgeDays'])
  })
})
