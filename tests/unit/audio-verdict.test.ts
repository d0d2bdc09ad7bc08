import { describe, expect, it } from 'vitest'
import { ZodError } from 'zod'
import {
  analyseSurfaceWav,
  encodeWav,
  judgeSurface,
  makeSurfaceWav,
  makeToneWav,
  surfaceThresholdsSchema,
  thirdOctaveCentres,
  type SurfaceThresholds,
} from '../../server/audio'

// The default limits are shop choices: common practice, no source.
const defaults: SurfaceThresholds = surfaceThresholdsSchema.parse({})

const quiet = { aWeightedDbfs: -60, rotaryDb: 0, rotaryHz: null, clicksPerMinute: 0, peakDbfs: -40, durationS: 120, minimumRotarySeconds: 5 }

describe('surface thresholds schema', () => {
  it('fills in the shop defaults (common practice, no source)', () => {
    expect(defaults).toEqual({
      aWeightedDbfs: { marginal: -50, fail: -44 },
      rotaryDb: { marginal: 15, fail: 25 },
      clicksPerMinute: { marginal: 6, fail: 15 },
      // A take must cover 90 % of the surface's playing time; a pass holds 90 days (shop choices).
      coveragePercent: 90,
      passMaxAgeDays: 90,
    })
  })

  it('keeps what the maker set and defaults the rest', () => {
    const thresholds = surfaceThresholdsSchema.parse({ clicksPerMinute: { marginal: 2, fail: 4 } })
    expect(thresholds.clicksPerMinute).toEqual({ marginal: 2, fail: 4 })
    expect(thresholds.aWeightedDbfs).toEqual(defaults.aWeightedDbfs)
  })

  it('refuses a marginal limit above the fail limit, and non-numbers', () => {
    expect(surfaceThresholdsSchema.safeParse({ rotaryDb: { marginal: 30, fail: 20 } }).success).toBe(false)
    expect(surfaceThresholdsSchema.safeParse({ aWeightedDbfs: { marginal: 'loud', fail: -40 } }).success).toBe(false)
    expect(() => analyseSurfaceWav(makeSurfaceWav({ seconds: 1 }), { thresholds: { rotaryDb: { marginal: 30, fail: 20 } } })).toThrow(ZodError)
  })
})

describe('verdict', () => {
  it('passes a quiet surface with one reason saying so', () => {
    const { verdict, reasons } = judgeSurface(quiet, defaults)
    expect(verdict).toBe('pass')
    expect(reasons).toHaveLength(1)
    expect(reasons[0]).toMatch(/within the shop's limits/)
  })

  it.each([
    ['aWeightedDbfs', -48, 'marginal', /Surface noise is −48\.0 dBFS A-weighted, above the marginal limit of −50\.0 dBFS/],
    ['aWeightedDbfs', -40, 'fail', /above the fail limit of −44\.0 dBFS/],
    ['rotaryDb', 18, 'marginal', /Once-per-turn noise is 18\.0 dB, above the marginal limit of 15\.0 dB/],
    ['rotaryDb', 31, 'fail', /above the fail limit of 25\.0 dB/],
    ['clicksPerMinute', 8, 'marginal', /8\.0 clicks per minute, above the marginal limit of 6\.0 per minute/],
    ['clicksPerMinute', 20, 'fail', /20\.0 clicks per minute, above the fail limit of 15\.0 per minute/],
  ] as const)('%s = %s → %s with a reason', (measure, value, expected, reason) => {
    const { verdict, reasons } = judgeSurface({ ...quiet, [measure]: value }, defaults)
    expect(verdict).toBe(expected)
    expect(reasons).toHaveLength(1)
    expect(reasons[0]).toMatch(reason)
  })

  it('takes the worst of several problems and lists them all', () => {
    const { verdict, reasons } = judgeSurface({ ...quiet, aWeightedDbfs: -47, clicksPerMinute: 40, rotaryDb: 16, rotaryHz: 2.66 }, defaults)
    expect(verdict).toBe('fail')
    expect(reasons).toHaveLength(3)
    expect(reasons.join('\n')).toMatch(/at 2\.66 Hz/)
  })

  it('a value exactly at a limit is still within it', () => {
    expect(judgeSurface({ ...quiet, clicksPerMinute: 6 }, defaults).verdict).toBe('pass')
    expect(judgeSurface({ ...quiet, clicksPerMinute: 15 }, defaults).verdict).toBe('marginal')
  })

  it('follows the maker’s own limits', () => {
    const strict = surfaceThresholdsSchema.parse({ aWeightedDbfs: { marginal: -65, fail: -62 } })
    expect(judgeSurface({ ...quiet, aWeightedDbfs: -70 }, strict).verdict).toBe('pass')
    expect(judgeSurface({ ...quiet, aWeightedDbfs: -63 }, strict).verdict).toBe('marginal')
    expect(judgeSurface({ ...quiet, aWeightedDbfs: -60 }, strict).verdict).toBe('fail')
  })

  it('fails a silent recording instead of calling it a perfect surface', () => {
    const { verdict, reasons } = judgeSurface({ ...quiet, aWeightedDbfs: -160, peakDbfs: -160 }, defaults)
    expect(verdict).toBe('fail')
    expect(reasons[0]).toMatch(/silent/)
  })
})

describe('end to end on generated surfaces', () => {
  it('a silent recording fails for that one reason', () => {
    const silence = encodeWav(new Float32Array(44100 * 20), { sampleRate: 44100 })
    const result = analyseSurfaceWav(silence)
    expect(result.verdict).toBe('fail')
    expect(result.reasons).toHaveLength(1)
    expect(result.reasons[0]).toMatch(/silent/)
    expect(result.peakDbfs).toBe(-160)
    expect(JSON.parse(JSON.stringify(result))).toEqual(result)
  })

  it('a quiet, steady surface passes', () => {
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 20, levelDbfs: -58, clicks: 1, seed: 31 }))
    expect(result.verdict).toBe('pass')
  })

  it('a loud, swelling, clicky surface fails on all three counts', () => {
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 20, levelDbfs: -38, swellDepth: 0.4, clicks: 10, seed: 32 }))
    expect(result.verdict).toBe('fail')
    expect(result.reasons).toHaveLength(3)
  })

  it('a surface with a few clicks too many is marginal', () => {
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, levelDbfs: -58, clicks: 4, seed: 33 }))
    expect(result.clicksPerMinute).toBeCloseTo(8, 5)
    expect(result.verdict).toBe('marginal')
  })

  it('returns the documented shape, JSON-safe', () => {
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, sampleRate: 48000, channels: 2, bits: 24, swellDepth: 0.2, clicks: 3, seed: 34 }))
    expect(Object.keys(result)).toEqual(
      expect.arrayContaining([
        'durationS', 'sampleRate', 'channels', 'peakDbfs', 'rmsDbfs', 'aWeightedDbfs', 'crestDb', 'rotaryDb', 'rotaryHz',
        'clicksPerMinute', 'verdict', 'reasons', 'spectrum', 'envelope',
      ]),
    )
    expect(result).toMatchObject({ durationS: 30, sampleRate: 48000, channels: 2 })
    // 1/3-octave bands at base-10 centres, 20 Hz to 20 kHz at 48 kHz.
    expect(result.spectrum.map(band => band.hz)).toEqual(thirdOctaveCentres(48000).map(hz => Math.round(hz * 10) / 10))
    expect(result.spectrum[0]!.hz).toBeCloseTo(20, 0)
    expect(result.spectrum.at(-1)!.hz).toBeCloseTo(19952.6, 1)
    expect(result.envelope.length).toBeGreaterThanOrEqual(600)
    expect(result.envelope.length).toBeLessThanOrEqual(1000)
    expect(result.envelope.every(Number.isFinite)).toBe(true)
    expect(JSON.parse(JSON.stringify(result))).toEqual(result)
  })

  it('the spectrum of white noise rises 1 dB per 1/3 octave, at the level its bandwidth implies', () => {
    // Arithmetic: white noise has equal power per Hz; each base-10 1/3-octave band is 10^0.1 times
    // wider than the one below (+1 dB) and holds bandwidth / (fs/2) of the total power.
    const sampleRate = 44100
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, levelDbfs: -40, seed: 36, sampleFormat: 'float', sampleRate }))
    const bands = result.spectrum.filter(band => band.hz >= 250 && band.hz <= 16000)
    const expected = bands.map(band => result.rmsDbfs + 10 * Math.log10((band.hz * (10 ** 0.05 - 10 ** -0.05)) / (sampleRate / 2)))
    const errors = bands.map((band, i) => band.db - expected[i]!)
    // Each band is an estimate from 24 Welch segments: about ±0.1–0.3 dB of scatter, so judge the
    // mean and the slope, and every band loosely.
    const meanError = errors.reduce((a, b) => a + b, 0) / errors.length
    expect(Math.abs(meanError)).toBeLessThan(0.15)
    const n = bands.length
    const xMean = (n - 1) / 2
    const yMean = bands.reduce((sum, band) => sum + band.db, 0) / n
    const slope = bands.reduce((sum, band, i) => sum + (i - xMean) * (band.db - yMean), 0) / bands.reduce((sum, _band, i) => sum + (i - xMean) ** 2, 0)
    expect(Math.abs(slope - 1)).toBeLessThan(0.03)
    for (const error of errors) expect(Math.abs(error)).toBeLessThan(1)
  })

  it('a 1 kHz sine at −20 dBFS reads −20 dB in the 1 kHz band and far less elsewhere', () => {
    // Source: AES17 convention carried to the band levels (a full-scale sine in a band reads 0 dB).
    const result = analyseSurfaceWav(makeToneWav({ frequencyHz: 1000, peakDbfs: -20, seconds: 2, sampleFormat: 'float' }))
    const band = (hz: number) => result.spectrum.find(b => Math.abs(b.hz / hz - 1) < 0.03)!.db
    expect(Math.abs(band(1000) + 20)).toBeLessThan(0.2)
    expect(band(500)).toBeLessThan(-80)
    expect(band(2000)).toBeLessThan(-80)
  })

  it('the envelope follows the level (a file at −30 dBFS plots around −30)', () => {
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 20, levelDbfs: -30, seed: 35 }))
    const mean = result.envelope.reduce((a, b) => a + b, 0) / result.envelope.length
    expect(Math.abs(mean + 30)).toBeLessThan(0.3)
  })
})
