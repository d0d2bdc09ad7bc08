import { describe, expect, it } from 'vitest'
import {
  A_WEIGHTING_POLES_HZ,
  aWeightingDb,
  aWeightingFilterResponseDb,
  analyseSurfaceWav,
  makeToneWav,
} from '../../server/audio'

// IEC 61672-1 Table 3 (A-weighting, dB) at the exact base-10 frequencies 10^(1.5 … 4.2, step 0.3),
// i.e. nominal 31.5, 63, 125, 250, 500, 1k, 2k, 4k, 8k, 16k Hz.
const IEC_61672_TABLE_3: Array<[exponent: number, db: number]> = [
  [1.5, -39.4],
  [1.8, -26.2],
  [2.1, -16.1],
  [2.4, -8.6],
  [2.7, -3.2],
  [3.0, 0.0],
  [3.3, 1.2],
  [3.6, 1.0],
  [3.9, -1.1],
  [4.2, -6.6],
]

describe('analytic A-weighting (IEC 61672-1 Annex E)', () => {
  it('uses the Annex E pole frequencies', () => {
    // Source: IEC 61672-1 Annex E.
    expect(A_WEIGHTING_POLES_HZ).toEqual({ f1: 20.598997, f2: 107.65265, f3: 737.86223, f4: 12194.217 })
  })

  it('is normalised to 0 dB at 1 kHz', () => {
    // Source: IEC 61672-1 Annex E (A1000 normalisation).
    expect(Math.abs(aWeightingDb(1000))).toBeLessThan(1e-12)
  })

  it.each(IEC_61672_TABLE_3)('matches Table 3 at 10^%s Hz within ±0.05 dB', (exponent, tableDb) => {
    // Source: IEC 61672-1 Table 3 (values at the exact base-10 frequencies).
    expect(Math.abs(aWeightingDb(10 ** exponent) - tableDb)).toBeLessThanOrEqual(0.05)
  })

  it('gives −39.52 dB at nominal 31.5 Hz and −6.71 dB at nominal 16 kHz', () => {
    // Source: IEC 61672-1 Table 3; the analytic formula at the nominal frequencies 31.5 Hz and 16 kHz gives −39.52 and −6.71 dB, within ±0.15 dB of the table.
    expect(aWeightingDb(31.5)).toBeCloseTo(-39.52, 2)
    expect(aWeightingDb(16000)).toBeCloseTo(-6.71, 2)
  })
})

describe('digital A-weighting filter', () => {
  for (const sampleRate of [44100, 48000]) {
    it.each(IEC_61672_TABLE_3)(`at ${sampleRate} Hz reads Table 3 at 10^%s Hz within ±0.1 dB`, (exponent, tableDb) => {
      // Source: IEC 61672-1 Table 3. At 44.1 kHz the last point (15.85 kHz) is 0.72 of Nyquist
      // (22.05 kHz), where plain bilinear designs are 8 dB short; this design is held to the same
      // ±0.1 dB there (it measures ≈ 0.04 dB off), see the sweep below.
      expect(Math.abs(aWeightingFilterResponseDb(10 ** exponent, sampleRate) - tableDb)).toBeLessThanOrEqual(0.1)
    })
  }

  // Tolerances against the analytic curve over a fine sweep (design notes in aWeighting.ts).
  // Source of the curve: IEC 61672-1 Annex E. Near Nyquist a recursive filter cannot follow an
  // analog curve that keeps falling past fs/2, hence the looser bounds at the low sample rates.
  const sweeps: Array<[sampleRate: number, topHz: number, toleranceDb: number]> = [
    [44100, 20000, 0.05],
    [48000, 20000, 0.02],
    [96000, 20000, 0.01],
    [32000, 15680, 0.15],
    [22050, 10800, 0.12],
  ]
  it.each(sweeps)('at %s Hz follows the analytic curve from 10 Hz to %s Hz within ±%s dB', (sampleRate, topHz, toleranceDb) => {
    let worst = 0
    for (let f = 10; f <= topHz; f *= 1.01) {
      worst = Math.max(worst, Math.abs(aWeightingFilterResponseDb(f, sampleRate) - aWeightingDb(f)))
    }
    expect(worst).toBeLessThanOrEqual(toleranceDb)
  })

  it('is within ±0.1 dB up to 10 kHz at 44.1 and 48 kHz (the issue-4 requirement)', () => {
    // Source: IEC 61672-1 Annex E curve; requirement from the issue.
    for (const sampleRate of [44100, 48000]) {
      for (let f = 10; f <= 10000; f *= 1.005) {
        expect(Math.abs(aWeightingFilterResponseDb(f, sampleRate) - aWeightingDb(f))).toBeLessThanOrEqual(0.1)
      }
    }
  })

  it.each([
    [100, 44100],
    [1000, 44100],
    [4000, 44100],
    [10000, 44100],
    [63, 48000],
    [12500, 48000],
  ])('the streaming implementation weights a %s Hz sine at %s Hz as the curve says (±0.1 dB)', (frequencyHz, sampleRate) => {
    // Source: IEC 61672-1 Annex E curve; sine at −20 dBFS, float samples so quantisation plays no part.
    const bytes = makeToneWav({ frequencyHz, peakDbfs: -20, seconds: 2, sampleRate, sampleFormat: 'float' })
    const result = analyseSurfaceWav(bytes)
    expect(result.rmsDbfs).toBeCloseTo(-20, 2)
    expect(Math.abs(result.aWeightedDbfs - (-20 + aWeightingDb(frequencyHz)))).toBeLessThanOrEqual(0.1)
  })
})
