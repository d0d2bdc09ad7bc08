// One streaming pass over the recording for everything that needs every sample: sample peak,
// mean square, A-weighted mean square, per-frame energies (plain and A-weighted, 10 ms frames) for
// the envelopes, and the per-frame step statistics the click detector needs.
//
// Speed: this is the hot loop of the analysis (~6.6 M samples for a 150 s recording). It runs in a
// small WebAssembly kernel (kernel/surfacePass.wat) with 128-bit SIMD: two lanes of doubles filter
// two halves of the recording side by side. The A-weighting filter is recursive, so the second half
// cannot start from nothing: its lane starts WARM_UP_FRAMES (0.5 s) early and those frames are
// thrown away (the first half's lane has computed them). The slowest pole of the filter is 20.6 Hz;
// after 0.5 s its start-up transient is below 10⁻¹³ of the signal. 16-bit mono files, the usual
// case, are converted to floats inside the kernel too. The same computation one sample at a time in
// TypeScript is tests/unit/support/surfacePassReference.ts, against which the kernel is tested.
import { designAWeightingFilter } from './aWeighting'
import { OUT_VALUES_PER_FRAME, surfacePassKernel } from './kernel/surfacePassKernel'
import type { MonoSampleSource } from './decode'

/** AES17 / IEC 61606: RMS dBFS of a full-scale sine is 0, so add 10·log10(2) to 20·log10(rms). */
export const AES17_RMS_OFFSET_DB = 10 * Math.log10(2)

/** Levels below this are reported as this (JSON has no −Infinity). */
export const DB_FLOOR = -160

export function toDb(power: number): number {
  return power > 0 ? Math.max(DB_FLOOR, 10 * Math.log10(power)) : DB_FLOOR
}

export const FRAME_SECONDS = 0.01
export interface SurfacePass {
  sampleRate: number
  samples: number
  peak: number
  meanSquare: number
  aWeightedMeanSquare: number
  frameLength: number
  /** Sum of squares per frame; the last frame may be partial (`lastFrameLength`). */
  frameEnergy: Float64Array
  aWeightedFrameEnergy: Float64Array
  lastFrameLength: number
  /** Largest |x[i] − x[i−1]| within each frame. */
  frameMaxStep: Float32Array
  /** Mean |x[i] − x[i−1]| over each frame. */
  frameMeanStep: Float32Array
}

export function frameLengthFor(sampleRate: number): number {
  return Math.max(1, Math.round(sampleRate * FRAME_SECONDS))
}

/** Frames the second lane runs before its own stretch, so its filter has settled (0.5 s). */
export const WARM_UP_FRAMES = 50

export function runSurfacePass(source: MonoSampleSource): SurfacePass {
  const { sampleRate, frames: n } = source
  const frameLength = frameLengthFor(sampleRate)
  const frameCount = Math.ceil(n / frameLength)
  const fullFrames = Math.floor(n / frameLength)
  const frameEnergy = new Float64Array(frameCount)
  const aWeightedFrameEnergy = new Float64Array(frameCount)
  const frameMaxStep = new Float32Array(frameCount)
  const frameMeanStep = new Float32Array(frameCount)

  const kernel = surfacePassKernel(frameLength)
  const { pass, chunkFrames, coef, state, laneA, laneB, out, coefValues, stateValues, outValues } = kernel

  // Direct form I with shared histories. Sections 1 and 2 have the numerator 1 − 2z⁻¹ + z⁻² (by
  // construction, see aWeighting.ts), a second difference: with d = x[n] − x[n−1] (also the click
  // detector's step) it is d − d_prev, and likewise for section 2 on y1. Sections 3 and 4 are
  // scaled to b0 = 1 and their gains applied once per frame.
  const [s1, s2, s3, s4] = designAWeightingFilter(sampleRate).sections
  coefValues.set([s1.a1, s1.a2, s2.a1, s2.a2, s3.b1 / s3.b0, s3.b2 / s3.b0, s3.a1, s3.a2, s4.b1 / s4.b0, s4.b2 / s4.b0])
  const outputGain = s3.b0 * s4.b0
  const outputPowerGain = outputGain * outputGain

  const pcm16 = source.pcm16Mono
  const load = (lane: number, start: number, count: number) => {
    if (pcm16) kernel.loadLanePcm16(lane, pcm16.subarray(start * 2, (start + count) * 2))
    else kernel.loadLane(lane, view => source.readMono(start, count, view), count)
  }
  const one = new Float32Array(1)
  const sampleAt = (index: number) => {
    source.readMono(index, 1, one)
    return one[0]!
  }

  // Lane 0 covers frames [0, laneFrames), lane 1 [secondStart, secondStart + laneFrames): the
  // overlap (≥ WARM_UP_FRAMES) is lane 1's warm-up. A short recording runs in lane 0 alone (lane 1
  // repeats it and is ignored).
  const twoLanes = fullFrames >= 4 * WARM_UP_FRAMES
  const laneFrames = twoLanes ? Math.ceil((fullFrames + WARM_UP_FRAMES) / 2) : fullFrames
  const secondStart = fullFrames - laneFrames

  // Start as if the first sample's value had always been there: no step at the start, and a DC
  // offset does not kick the low-cut filters (their steady state for a constant input is zero).
  stateValues.fill(0)
  if (n > 0) {
    stateValues[0] = sampleAt(0)
    stateValues[1] = sampleAt(secondStart * frameLength)
  }

  const keep = (lane: 0 | 1, frame: number, slot: number, samples: number) => {
    const base = slot * OUT_VALUES_PER_FRAME + lane
    frameEnergy[frame] = outValues[base]!
    aWeightedFrameEnergy[frame] = outValues[base + 2]! * outputPowerGain
    frameMaxStep[frame] = outValues[base + 6]!
    frameMeanStep[frame] = outValues[base + 8]! / samples
    return outValues[base + 4]!
  }

  let peak = 0
  for (let done = 0; done < laneFrames; done += chunkFrames) {
    const frames = Math.min(chunkFrames, laneFrames - done)
    load(laneA, done * frameLength, frames * frameLength)
    load(laneB, (secondStart + done) * frameLength, frames * frameLength)
    pass(coef, state, laneA, laneB, frames, frameLength, out)
    for (let slot = 0; slot < frames; slot++) {
      peak = Math.max(peak, keep(0, done + slot, slot, frameLength))
      const second = secondStart + done + slot
      if (twoLanes && second >= laneFrames) peak = Math.max(peak, keep(1, second, slot, frameLength))
    }
  }
  // The last, partial frame continues lane 1, which ends where the full frames end (lane 0 is
  // given the same samples and ignored).
  const rest = n - fullFrames * frameLength
  if (rest > 0) {
    load(laneA, fullFrames * frameLength, rest)
    load(laneB, fullFrames * frameLength, rest)
    pass(coef, state, laneA, laneB, 1, rest, out)
    peak = Math.max(peak, keep(1, fullFrames, 0, rest))
  }

  let total = 0
  let aTotal = 0
  for (let frame = 0; frame < frameCount; frame++) {
    total += frameEnergy[frame]!
    aTotal += aWeightedFrameEnergy[frame]!
  }

  return {
    sampleRate,
    samples: n,
    peak,
    meanSquare: n > 0 ? total / n : 0,
    aWeightedMeanSquare: n > 0 ? aTotal / n : 0,
    frameLength,
    frameEnergy,
    aWeightedFrameEnergy,
    lastFrameLength: n - (frameCount - 1) * frameLength,
    frameMaxStep,
    frameMeanStep,
  }
}
