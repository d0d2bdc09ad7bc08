// Clicks: short impulses well above the local surface noise.
//
// Method:
//  1. High-pass by first difference, d[n] = x[n] − x[n−1]: a click's steep edge stands out;
//     rumble, hum and the slow once-per-turn swell do not.
//  2. Local scale: the mean absolute deviation of d over each 10 ms frame (d is zero-mean), then
//     the running median of those over 11 frames (±50 ms). A click lasts a millisecond or two, so
//     it can lift one or two frames' mean but not the median of eleven — the median makes the
//     scale robust, and taking it over frame means rather than over every sample keeps it cheap
//     (a per-sample median over 50 ms cost more than the whole rest of the analysis).
//  3. A click is an excursion |d[n]| > k × scale with k = 8.5. For Gaussian noise the mean
//     absolute deviation is 0.80 σ, so that is 6.8 σ of d: about one false click per 10⁴ minutes
//     of audio. (In median-absolute-deviation terms, which is 0.67 σ, k would be 10.) Never below
//     10⁻⁴ (−80 dBFS), so digital silence or a lone LSB step is not a click.
//  4. After a click, 30 ms of dead time, so one click (and its ringing) is counted once.
// The streaming pass (levels.ts) records the mean and the largest |d| of every frame; only frames
// whose largest step crosses their threshold are read again, to place the clicks exactly.
import type { MonoSampleSource } from './decode'
import type { SurfacePass } from './levels'

export interface ClickOptions {
  k?: number
  deadTimeSeconds?: number
}

export interface ClickResult {
  count: number
  /** Click times in seconds (the first 1000). */
  timesS: number[]
}

export const CLICK_DEFAULTS = { k: 8.5, deadTimeSeconds: 0.03, minimumThreshold: 1e-4, medianFrames: 11 } as const

const MAX_REPORTED_TIMES = 1000

/** Running median of `values` over `width` (odd) neighbours, the window clipped at the ends. */
function runningMedian(values: Float32Array, width: number): Float32Array {
  const n = values.length
  const half = width >> 1
  const out = new Float32Array(n)
  const window = new Float64Array(width)
  for (let i = 0; i < n; i++) {
    const from = Math.max(0, i - half)
    const to = Math.min(n - 1, i + half)
    let count = 0
    for (let j = from; j <= to; j++) {
      // Insertion sort: eleven values, no allocation.
      const value = values[j]!
      let k = count++
      while (k > 0 && window[k - 1]! > value) {
        window[k] = window[k - 1]!
        k--
      }
      window[k] = value
    }
    out[i] = count % 2 ? window[count >> 1]! : 0.5 * (window[(count >> 1) - 1]! + window[count >> 1]!)
  }
  return out
}

/** Find the clicks from the pass' statistics, re-reading only frames that may hold one. */
export function findClicks(source: MonoSampleSource, pass: SurfacePass, options: ClickOptions = {}): ClickResult {
  const k = options.k ?? CLICK_DEFAULTS.k
  const deadTime = Math.round((options.deadTimeSeconds ?? CLICK_DEFAULTS.deadTimeSeconds) * source.sampleRate)
  const { frameLength, frameMaxStep } = pass
  const scale = runningMedian(pass.frameMeanStep, CLICK_DEFAULTS.medianFrames)

  const frame = new Float32Array(frameLength + 1)
  const timesS: number[] = []
  let count = 0
  let quietUntil = -1
  for (let f = 0; f < frameMaxStep.length; f++) {
    const threshold = Math.max(k * scale[f]!, CLICK_DEFAULTS.minimumThreshold)
    if (!(frameMaxStep[f]! > threshold)) continue
    const start = f * frameLength
    const end = Math.min(source.frames, start + frameLength)
    if (end <= quietUntil) continue
    // Read one sample before the frame so its first step is known (the file's first sample has none).
    const from = Math.max(0, start - 1)
    source.readMono(from, end - from, frame)
    for (let i = Math.max(1, start); i < end; i++) {
      const step = Math.abs(frame[i - from]! - frame[i - 1 - from]!)
      if (step > threshold && i >= quietUntil) {
        count++
        if (timesS.length < MAX_REPORTED_TIMES) timesS.push(i / source.sampleRate)
        quietUntil = i + deadTime
      }
    }
  }
  return { count, timesS }
}
