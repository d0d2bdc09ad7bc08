import { describe, expect, it } from 'vitest'
import { analyseSurfaceSamples, analyseSurfaceWav, countClicks, encodeWav, makeSurfaceSignal, makeSurfaceWav } from '../../server/audio'

// Rotation frequency = rpm ÷ 60 (cylinder geometry; arithmetic): 2.67 Hz at 160 rpm, 2.4 Hz at 144.

describe('once-per-turn (rotary) noise', () => {
  it.each([
    [160, 0.3, 1],
    [160, 0.1, 2],
    [144, 0.3, 3],
    [144, 0.1, 4],
  ])('a swell at %s rpm (depth %s) is found at rpm/60 ± 0.1 Hz and reads clearly high', (rpm, swellDepth, seed) => {
    // Source: arithmetic (rpm ÷ 60); the swell is generated at exactly that frequency.
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 40, rpm, swellDepth, seed, clicks: 4 }), { rpm })
    expect(result.rotaryDetected).toBe(true)
    expect(result.rotaryHz).not.toBeNull()
    expect(Math.abs(result.rotaryHz! - rpm / 60)).toBeLessThanOrEqual(0.1)
    expect(result.rotaryDb!).toBeGreaterThan(20)
  })

  it('reports the level swing of the swell (peak to peak, dB) within 10 %', () => {
    // Arithmetic: noise × (1 + d·sin) swings by 20·log10((1 + d)/(1 − d)) dB.
    for (const swellDepth of [0.05, 0.2]) {
      const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 40, swellDepth, seed: 5 }))
      const swing = 20 * Math.log10((1 + swellDepth) / (1 - swellDepth))
      expect(Math.abs(result.rotarySwingDb! - swing) / swing).toBeLessThan(0.1)
    }
  })

  it.each([1, 2, 3, 4, 5])('steady noise without a swell is not detected (seed %s) and reads low', (seed) => {
    // Known answer: the generator adds no swell; the detection threshold (13 dB per bin) is out of
    // reach of noise alone (rotary.ts), and rotaryDb of noise alone is about −7…+1 dB.
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 40, seed, clicks: 6, colour: seed % 2 ? 'white' : 'soft' }))
    expect(result.rotaryDetected).toBe(false)
    expect(result.rotaryHz).toBeNull()
    expect(result.rotaryDb!).toBeLessThan(6)
  })

  it('a stronger swell reads higher', () => {
    const weak = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, swellDepth: 0.03, seed: 6 }))
    const strong = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, swellDepth: 0.3, seed: 6 }))
    expect(strong.rotaryDb! - weak.rotaryDb!).toBeGreaterThan(10)
  })

  it('looks at the speed it is told: a 144 rpm swell is not taken for 160 rpm rotary noise', () => {
    // Arithmetic: 2.4 Hz is 10 % below 2.67 Hz, outside the ±6 % search around the stated speed.
    const bytes = makeSurfaceWav({ seconds: 40, rpm: 144, swellDepth: 0.3, seed: 7 })
    expect(analyseSurfaceWav(bytes, { rpm: 160 }).rotaryDetected).toBe(false)
    expect(analyseSurfaceWav(bytes, { rpm: 144 }).rotaryDetected).toBe(true)
  })

  it('finds a machine running 3 % slow', () => {
    // A governor a little off: 155.2 rpm played and analysed as 160 rpm.
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 40, rpm: 155.2, swellDepth: 0.2, seed: 8 }), { rpm: 160 })
    expect(result.rotaryDetected).toBe(true)
    expect(Math.abs(result.rotaryHz! - 155.2 / 60)).toBeLessThanOrEqual(0.02)
  })

  it('is not thrown by digital silence before the stylus is set down', () => {
    const withLeadIn = (swellDepth: number) => {
      const signal = makeSurfaceSignal({ seconds: 40, swellDepth, seed: 9 })
      signal.samples.fill(0, 0, 5 * signal.sampleRate)
      return encodeWav(signal.samples, { sampleRate: signal.sampleRate })
    }
    const swelling = analyseSurfaceWav(withLeadIn(0.2))
    expect(swelling.rotaryDetected).toBe(true)
    expect(Math.abs(swelling.rotaryHz! - 160 / 60)).toBeLessThanOrEqual(0.1)
    const steady = analyseSurfaceWav(withLeadIn(0))
    expect(steady.rotaryDetected).toBe(false)
    expect(steady.rotaryDb!).toBeLessThan(6)
    // A clean start of the noise after silence is not a click either.
    expect(steady.clickCount).toBe(0)
  })

  it('is not judged on a recording shorter than ten turns', () => {
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 3, swellDepth: 0.5 }))
    expect(result.rotaryDb).toBeNull()
    expect(result.verdict).not.toBe('pass')
    expect(result.reasons.join(' ')).toMatch(/too short/)
  })
})

describe('clicks', () => {
  it('a file with 12 clicks in 60 s reports 12 ± 1 per minute, at the right times', () => {
    // Known answer: the generator placed the clicks and reports where.
    const signal = makeSurfaceSignal({ seconds: 60, clicks: 12, seed: 12 })
    const result = analyseSurfaceSamples(signal.samples, signal.sampleRate)
    expect(Math.abs(result.clicksPerMinute - 12)).toBeLessThanOrEqual(1)
    expect(result.clickCount).toBe(12)
    result.clickTimesS.forEach((time, i) => expect(Math.abs(time - signal.clickTimesS[i]!)).toBeLessThan(0.001))
  })

  it('still counts them under a strong once-per-turn swell and in a 16-bit file', () => {
    // Known answer from the generator (12 clicks).
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 60, clicks: 12, swellDepth: 0.5, seed: 13 }))
    expect(Math.abs(result.clicksPerMinute - 12)).toBeLessThanOrEqual(1)
  })

  it.each([-30, -50, -70])('a file with no clicks at %s dBFS reports ~0 per minute', (levelDbfs) => {
    // Known answer from the generator (no clicks); Gaussian noise never reaches 6.8 σ in 30 s.
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, levelDbfs, seed: 14, swellDepth: 0.3 }))
    expect(result.clicksPerMinute).toBeLessThanOrEqual(0.5)
  })

  it('scales with the rate: 30 clicks in 30 s are 60 per minute', () => {
    // Arithmetic on the generator's known answer.
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 30, clicks: 30, seed: 15 }))
    expect(Math.abs(result.clicksPerMinute - 60)).toBeLessThanOrEqual(2)
  })

  it('ignores clicks barely above the noise (threshold k × MAD)', () => {
    // A spike 10 dB over the noise RMS is surface texture, not a click.
    const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 20, clicks: 10, clickLevelDb: 10, seed: 16 }))
    expect(result.clickCount).toBeLessThanOrEqual(1)
  })

  it('counts a click once, however long it rings (dead time)', () => {
    const sampleRate = 44100
    const samples = makeSurfaceSignal({ seconds: 2, seed: 17, levelDbfs: -50, sampleRate }).samples
    // A 10 ms burst of alternating full-scale steps: many excursions, one click.
    const start = sampleRate
    for (let i = 0; i < 441; i++) samples[start + i] = i % 2 ? 0.5 : -0.5
    expect(countClicks(samples, sampleRate).count).toBe(1)
  })

  it('digital silence has no clicks, and a lone step up from silence is one', () => {
    const samples = new Float32Array(44100)
    expect(countClicks(samples, 44100).count).toBe(0)
    samples.fill(0.01, 20000)
    expect(countClicks(samples, 44100).count).toBe(1)
  })
})
