// The surface pass in plain TypeScript, one sample at a time: the readable form of the WebAssembly
// kernel (server/audio/kernel/surfacePass.wat) that the server runs. The unit tests check the
// kernel against this. It was the server's own implementation until the kernel replaced it for speed.
import { designAWeightingFilter } from '../../../server/audio/aWeighting'
import type { MonoSampleSource } from '../../../server/audio/decode'
import { frameLengthFor, type SurfacePass } from '../../../server/audio/levels'

/** Frames converted and processed per read (1.6 s). */
const FRAMES_PER_CHUNK = 160

export function runSurfacePassReference(source: MonoSampleSource): SurfacePass {
  const { sampleRate, frames: n } = source
  const frameLength = frameLengthFor(sampleRate)
  const chunkLength = frameLength * FRAMES_PER_CHUNK
  const frameCount = Math.ceil(n / frameLength)
  const frameEnergy = new Float64Array(frameCount)
  const aWeightedFrameEnergy = new Float64Array(frameCount)
  const frameMaxStep = new Float32Array(frameCount)
  const frameMeanStep = new Float32Array(frameCount)
  const buffer = new Float32Array(Math.min(chunkLength, Math.max(1, n)))

  // Direct form I with shared histories. Sections 1 and 2 have the numerator 1 − 2z⁻¹ + z⁻² (by
  // construction, see aWeighting.ts), a second difference: with d = x[n] − x[n−1] (also the click
  // detector's step) it is d − d_prev, and likewise for section 2 on y1. Sections 3 and 4 are
  // scaled to b0 = 1 and their gains applied once per frame.
  const [s1, s2, s3, s4] = designAWeightingFilter(sampleRate).sections
  const a11 = s1.a1, a12 = s1.a2, a21 = s2.a1, a22 = s2.a2
  const c31 = s3.b1 / s3.b0, c32 = s3.b2 / s3.b0, a31 = s3.a1, a32 = s3.a2
  const c41 = s4.b1 / s4.b0, c42 = s4.b2 / s4.b0
  const outputGain = s3.b0 * s4.b0
  const outputPowerGain = outputGain * outputGain

  // Start as if the first sample's value had always been there: no step at the start, and a DC
  // offset does not kick the low-cut filters.
  if (n > 0) source.readMono(0, 1, buffer)
  let x1 = n > 0 ? buffer[0]! : 0
  let d1 = 0, e1 = 0
  let y1p = 0, y1pp = 0, y2p = 0, y2pp = 0, y3p = 0, y3pp = 0
  let peak = 0
  let total = 0
  let aTotal = 0
  let frame = 0

  for (let chunkStart = 0; chunkStart < n; chunkStart += chunkLength) {
    const count = Math.min(chunkLength, n - chunkStart)
    source.readMono(chunkStart, count, buffer)
    for (let frameStart = 0; frameStart < count; frameStart += frameLength, frame++) {
      const frameEnd = Math.min(count, frameStart + frameLength)
      let sum = 0
      let aSum = 0
      let maxAbs = 0
      let maxStep = 0
      let stepSum = 0
      for (let i = frameStart; i < frameEnd; i++) {
        const x = buffer[i]!
        sum += x * x
        maxAbs = Math.max(maxAbs, Math.abs(x))
        const d = x - x1
        const step = Math.abs(d)
        maxStep = Math.max(maxStep, step)
        stepSum += step
        // The y_prev term last: it is the one on the recursive critical path.
        const y1 = d - d1 - a12 * y1pp - a11 * y1p
        const e = y1 - y1p
        const y2 = e - e1 - a22 * y2pp - a21 * y2p
        const y3 = y2 + c31 * y2p + c32 * y2pp - a32 * y3pp - a31 * y3p
        const y4 = y3 + c41 * y3p + c42 * y3pp
        aSum += y4 * y4
        x1 = x
        d1 = d
        e1 = e
        y1pp = y1p
        y1p = y1
        y2pp = y2p
        y2p = y2
        y3pp = y3p
        y3p = y3
      }
      aSum *= outputPowerGain
      frameEnergy[frame] = sum
      aWeightedFrameEnergy[frame] = aSum
      frameMaxStep[frame] = maxStep
      frameMeanStep[frame] = stepSum / (frameEnd - frameStart)
      peak = Math.max(peak, maxAbs)
      total += sum
      aTotal += aSum
    }
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
