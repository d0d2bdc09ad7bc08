// The WebAssembly surface-pass kernel against its plain TypeScript reference (common practice, no
// source: an optimised kernel is checked against a straightforward implementation of the same
// arithmetic), and the committed binary against its WebAssembly text.
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { assembleSurfacePassKernel } from '../../scripts/lib/assembleKernel'
import { decodeWav, makeSurfaceWav, makeToneSignal, monoSourceFromSamples, runSurfacePass, type MonoSampleSource } from '../../server/audio'
import { SURFACE_PASS_WASM_BASE64 } from '../../server/audio/kernel/surfacePassWasm'
import { frameLengthFor, WARM_UP_FRAMES } from '../../server/audio/levels'
import { runSurfacePassReference } from './support/surfacePassReference'

function relativeError(a: number, b: number): number {
  const scale = Math.max(Math.abs(a), Math.abs(b))
  return scale === 0 ? 0 : Math.abs(a - b) / scale
}

/** Run both and compare everything the pass returns. */
function expectSameAsReference(source: MonoSampleSource, aWeightedTolerance = 1e-9) {
  const kernel = runSurfacePass(source)
  const reference = runSurfacePassReference(source)
  expect(kernel.frameLength).toBe(reference.frameLength)
  expect(kernel.lastFrameLength).toBe(reference.lastFrameLength)
  expect(kernel.frameEnergy.length).toBe(reference.frameEnergy.length)
  // What depends only on the samples and their steps comes out exactly the same …
  expect(kernel.peak).toBe(reference.peak)
  expect(kernel.meanSquare).toBe(reference.meanSquare)
  expect(Array.from(kernel.frameEnergy)).toEqual(Array.from(reference.frameEnergy))
  expect(Array.from(kernel.frameMaxStep)).toEqual(Array.from(reference.frameMaxStep))
  expect(Array.from(kernel.frameMeanStep)).toEqual(Array.from(reference.frameMeanStep))
  // … and the A-weighted energies within rounding: the second lane's filter starts 0.5 s early
  // rather than at the start of the file.
  let worst = 0
  for (let f = 0; f < kernel.aWeightedFrameEnergy.length; f++) {
    worst = Math.max(worst, relativeError(kernel.aWeightedFrameEnergy[f]!, reference.aWeightedFrameEnergy[f]!))
  }
  expect(worst).toBeLessThanOrEqual(aWeightedTolerance)
  expect(relativeError(kernel.aWeightedMeanSquare, reference.aWeightedMeanSquare)).toBeLessThanOrEqual(1e-12)
  return { kernel, reference }
}

describe('the surface-pass kernel', () => {
  it('is assembled from the committed WebAssembly text (rebuild with npm run build:kernel)', async () => {
    const wat = readFileSync(new URL('../../server/audio/kernel/surfacePass.wat', import.meta.url), 'utf8')
    expect(await assembleSurfacePassKernel(wat)).toBe(SURFACE_PASS_WASM_BASE64)
  })

  it('matches the reference on a 16-bit mono recording (two lanes, 16-bit path in the kernel)', () => {
    const wav = decodeWav(makeSurfaceWav({ seconds: 12.345, levelDbfs: -40, swellDepth: 0.4, clicks: 9, seed: 11 }))
    expect(wav.pcm16Mono).toBeDefined()
    const frames = Math.floor(wav.frames / frameLengthFor(wav.sampleRate))
    expect(frames).toBeGreaterThanOrEqual(4 * WARM_UP_FRAMES)
    const { kernel } = expectSameAsReference(wav)
    // The A-weighted energy is really there (a wrong kernel writing zeros would not match anyway).
    expect(kernel.aWeightedMeanSquare).toBeGreaterThan(0)
  })

  it('matches the reference through readMono: 24-bit stereo at 48 kHz, 32-bit float at 96 kHz', () => {
    expectSameAsReference(decodeWav(makeSurfaceWav({ seconds: 6.01, sampleRate: 48000, bits: 24, channels: 2, levelDbfs: -30, clicks: 4, seed: 5 })))
    expectSameAsReference(decodeWav(makeSurfaceWav({ seconds: 4.5, sampleRate: 96000, sampleFormat: 'float', levelDbfs: -20, swellDepth: 0.2, seed: 6 })))
  })

  it('matches the reference where the second lane is hardest to warm up: loud 25 Hz and a DC offset', () => {
    const tone = makeToneSignal({ frequencyHz: 25, seconds: 8, sampleRate: 22050, peakDbfs: -1 })
    for (let i = 0; i < tone.length; i++) tone[i] = tone[i]! * 0.8 + 0.15
    expectSameAsReference(monoSourceFromSamples(tone, 22050))
  })

  it('matches the reference on short recordings (one lane) and on less than one frame', () => {
    expectSameAsReference(decodeWav(makeSurfaceWav({ seconds: 1.2345, seed: 2 })))
    expectSameAsReference(monoSourceFromSamples(Float32Array.from({ length: 300 }, (_, i) => Math.sin(i / 7) * 0.5), 44100))
    expectSameAsReference(monoSourceFromSamples(new Float32Array([0.25]), 44100))
  })

  it('gives the same answer when run again (its state is reset between recordings)', () => {
    const wav = decodeWav(makeSurfaceWav({ seconds: 5, levelDbfs: -35, seed: 9 }))
    const first = runSurfacePass(wav)
    runSurfacePass(decodeWav(makeSurfaceWav({ seconds: 3, sampleRate: 96000, levelDbfs: -6, seed: 1 })))
    const again = runSurfacePass(wav)
    expect(Array.from(again.aWeightedFrameEnergy)).toEqual(Array.from(first.aWeightedFrameEnergy))
  })
})
