import { execFileSync, spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { analyseSurfaceWav, decodeWavSamples, makeSurfaceWav, makeToneWav, type SurfaceWavOptions } from '../../server/audio'

function soxAvailable(): boolean {
  try {
    execFileSync('sox', ['--version'], { stdio: 'ignore' })
    return true
  }
  catch {
    return false
  }
}
const hasSox = soxAvailable()
if (!hasSox) console.warn('sox is not installed: the sox cross-check of RMS levels is SKIPPED (apt-get install sox; CI installs it)')

const dir = mkdtempSync(join(tmpdir(), 'groovewright-audio-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

/** "RMS lev dB" of `sox FILE -n stats` (the Overall column for stereo). */
function soxRmsLevDb(bytes: Uint8Array, name: string): number {
  const file = join(dir, name)
  writeFileSync(file, bytes)
  // sox prints its stats on stderr.
  const run = spawnSync('sox', [file, '-n', 'stats'], { encoding: 'utf8' })
  if (run.status !== 0) throw new Error(`sox failed on ${name}: ${run.stderr}`)
  const line = run.stderr.split('\n').find(l => l.startsWith('RMS lev dB'))
  if (!line) throw new Error(`no "RMS lev dB" line from sox for ${name}`)
  const value = Number(line.replace('RMS lev dB', '').trim().split(/\s+/)[0])
  if (!Number.isFinite(value)) throw new Error(`could not read sox's RMS level from "${line}"`)
  return value
}

const AES17_OFFSET = 3.0103

describe('levels in the AES17 convention', () => {
  it('a full-scale 997 Hz sine reads 0.00 ± 0.01 dBFS RMS', () => {
    // Source: AES17 (also IEC 61606): full-scale sine = 0 dBFS.
    const result = analyseSurfaceWav(makeToneWav({ frequencyHz: 997, seconds: 1, bits: 24 }))
    expect(Math.abs(result.rmsDbfs)).toBeLessThanOrEqual(0.01)
    expect(Math.abs(result.peakDbfs)).toBeLessThanOrEqual(0.01)
    expect(result.crestDb).toBeCloseTo(3.01, 2)
  })

  it('a full-scale 997 Hz square reads +3.01 ± 0.01 dBFS RMS', () => {
    // Source: AES17: full-scale square = +3.01 dBFS.
    const result = analyseSurfaceWav(makeToneWav({ frequencyHz: 997, seconds: 1, bits: 24, waveform: 'square' }))
    expect(Math.abs(result.rmsDbfs - 3.01)).toBeLessThanOrEqual(0.01)
    expect(Math.abs(result.crestDb)).toBeLessThanOrEqual(0.01)
  })

  it('a 1 kHz sine at −20 dBFS reads −20.0 ± 0.1 dBFS A-weighted', () => {
    // Source: IEC 61672-1 (A(1 kHz) = 0 dB) and AES17 (sine RMS convention).
    const result = analyseSurfaceWav(makeToneWav({ frequencyHz: 1000, peakDbfs: -20, seconds: 1 }))
    expect(Math.abs(result.aWeightedDbfs + 20)).toBeLessThanOrEqual(0.1)
    expect(Math.abs(result.rmsDbfs + 20)).toBeLessThanOrEqual(0.01)
    expect(Math.abs(result.peakDbfs + 20)).toBeLessThanOrEqual(0.01)
  })

  it('a sine at −6 dBFS peak and −26 dBFS peak differ by 20 dB in every level', () => {
    // Arithmetic: levels scale with amplitude.
    const loud = analyseSurfaceWav(makeToneWav({ frequencyHz: 440, peakDbfs: -6, seconds: 1, bits: 24 }))
    const quiet = analyseSurfaceWav(makeToneWav({ frequencyHz: 440, peakDbfs: -26, seconds: 1, bits: 24 }))
    expect(loud.peakDbfs - quiet.peakDbfs).toBeCloseTo(20, 2)
    expect(loud.rmsDbfs - quiet.rmsDbfs).toBeCloseTo(20, 2)
    expect(loud.aWeightedDbfs - quiet.aWeightedDbfs).toBeCloseTo(20, 2)
  })

  it('generated noise lands on the requested level (synth self-check)', () => {
    // Arithmetic: the generator scales its noise to the requested AES17 RMS level.
    for (const levelDbfs of [-30, -50, -65]) {
      const result = analyseSurfaceWav(makeSurfaceWav({ seconds: 5, levelDbfs, bits: 24, seed: 11 }))
      expect(Math.abs(result.rmsDbfs - levelDbfs)).toBeLessThanOrEqual(0.02)
    }
  })
})

describe('cross-check with sox', () => {
  const cases: Array<[name: string, options: SurfaceWavOptions]> = [
    ['16-bit 44.1 kHz −50 dBFS', { seconds: 6, levelDbfs: -50, bits: 16, sampleRate: 44100 }],
    ['16-bit 48 kHz −30 dBFS soft', { seconds: 6, levelDbfs: -30, bits: 16, sampleRate: 48000, colour: 'soft' }],
    ['24-bit 48 kHz −65 dBFS', { seconds: 6, levelDbfs: -65, bits: 24, sampleRate: 48000 }],
    ['32-bit int 44.1 kHz −40 dBFS swell + clicks', { seconds: 6, levelDbfs: -40, bits: 32, swellDepth: 0.4, clicks: 5 }],
    ['32-bit float 44.1 kHz −45 dBFS', { seconds: 6, levelDbfs: -45, sampleFormat: 'float' }],
    ['16-bit stereo 44.1 kHz −55 dBFS', { seconds: 6, levelDbfs: -55, channels: 2 }],
    ['24-bit extensible 96 kHz −48 dBFS', { seconds: 3, levelDbfs: -48, bits: 24, sampleRate: 96000, extensible: true }],
  ]
  it.skipIf(!hasSox).each(cases)('%s: RMS within 0.05 dB of sox "RMS lev dB" + 3.01', (name, options) => {
    // Source: sox (Debian package) as a reference implementation; sox prints −3.01 dB for a
    // full-scale sine, so its value is converted to AES17 by adding 3.01 dB.
    const bytes = makeSurfaceWav({ seed: name.length, ...options })
    const ours = analyseSurfaceWav(bytes).rmsDbfs
    const sox = soxRmsLevDb(bytes, `${name.replace(/\W+/g, '-')}.wav`) + AES17_OFFSET
    expect(Math.abs(ours - sox)).toBeLessThanOrEqual(0.05)
  })

  it.skipIf(!hasSox)('sox reads a full-scale sine as −3.01 dB, which we read as 0.00', () => {
    // Source: sox (reference implementation) vs AES17.
    const bytes = makeToneWav({ frequencyHz: 997, seconds: 1, bits: 24 })
    expect(soxRmsLevDb(bytes, 'sine.wav')).toBeCloseTo(-3.01, 2)
  })
})

describe('sample formats decode to the same levels', () => {
  const base: SurfaceWavOptions = { seconds: 4, levelDbfs: -40, seed: 21, swellDepth: 0.2, clicks: 3 }
  const variants: Array<[name: string, options: Partial<SurfaceWavOptions>]> = [
    ['16-bit mono', { bits: 16 }],
    ['24-bit mono', { bits: 24 }],
    ['32-bit int mono', { bits: 32 }],
    ['32-bit float mono', { sampleFormat: 'float' }],
    ['16-bit stereo', { bits: 16, channels: 2 }],
    ['24-bit stereo', { bits: 24, channels: 2 }],
    ['32-bit int stereo', { bits: 32, channels: 2 }],
    ['32-bit float stereo', { sampleFormat: 'float', channels: 2 }],
    ['24-bit extensible stereo', { bits: 24, channels: 2, extensible: true }],
    ['float extensible mono', { sampleFormat: 'float', extensible: true }],
  ]
  const reference = analyseSurfaceWav(makeSurfaceWav({ ...base, sampleFormat: 'float' }))

  it.each(variants)('%s', (_name, options) => {
    // Arithmetic: the same signal quantised to ≥ 16 bits at −40 dBFS differs by far less than 0.01 dB.
    const result = analyseSurfaceWav(makeSurfaceWav({ ...base, ...options }))
    expect(result.channels).toBe(options.channels ?? 1)
    expect(Math.abs(result.rmsDbfs - reference.rmsDbfs)).toBeLessThanOrEqual(0.01)
    expect(Math.abs(result.aWeightedDbfs - reference.aWeightedDbfs)).toBeLessThanOrEqual(0.01)
    expect(Math.abs(result.peakDbfs - reference.peakDbfs)).toBeLessThanOrEqual(0.01)
    expect(result.clickCount).toBe(reference.clickCount)
  })

  it('decodes 24-bit and 32-bit samples exactly, including negative full scale', () => {
    // Arithmetic: two's-complement full scale is −2^(n−1).
    for (const bits of [16, 24, 32] as const) {
      const bytes = makeToneWav({ frequencyHz: 1000, seconds: 0.01, bits, waveform: 'square' })
      const { samples } = decodeWavSamples(bytes)
      expect(Math.min(...samples)).toBe(-1)
      expect(Math.max(...samples)).toBeCloseTo(1 - 2 ** -(bits - 1), 9)
    }
  })
})
