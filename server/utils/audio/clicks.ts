// Clicks: short impulses well above the local surface noise.
//
// Method:
//  1. High-pass by first difference, d[n] = x[n] − x[n−1]: a click's steep edge stands out;
//     rumble, hum and the slow once-per-turn swell do not.
//  2. Local scale per 50 ms block: the median of |d| over the block (the median absolute
//     deviation, d being zero-mean), estimated from every 8th step (≈ 275 values at 44.1 kHz).
//     A click lasts a millisecond or two, so it cannot move a median over 50 ms. Each block's
//     threshold uses the largest scale of itself and its two neighbours, so the onset of a louder
//     passage is not taken for a click.
//  3. A click is an excursion |d[n]| > k × scale with k = 10 (for Gaussian noise that is 6.7 σ
//     of d: about one false click per 10⁴ minutes of audio), and never below 10⁻⁴ (−80 dBFS),
//     so digital silence or a lone LSB step is not a click.
//  4. After a click, 30 ms of dead time, so one click (and its ringing) is counted once.
// The streaming pass (levels.ts) records the largest |d| of every 10 ms frame; only frames whose
// largest step crosses their threshold are read again to place the clicks exactly.
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

export const CLICK_DEFAULTS = { k: 10, deadTimeSeconds: 0.03, minimumThreshold: 1e-4, blockSeconds: 0.05 } as const

const STEP_SUBSAMPLE = 8
const MAX_REPORTED_TIMES = 1000

/** The k-th smallest of values[0 … length−1] (reorders them): Hoare's quickselect. */
export function selectKth(values: Float32Array, length: number, k: number): number {
  let left = 0
  let right = length - 1
  while (right > left) {
    const pivot = values[(left + right) >> 1]!
    let i = left
    let j = right
    while (i <= j) {
      while (values[i]! < pivot) i++
      while (values[j]! > pivot) j--
      if (i <= j) {
        const t = values[i]!
        values[i] = values[j]!
        values[j] = t
        i++
        j--
      }
    }
    if (k <= j) right = j
    else if (k >= i) left = i
    else break
  }
  return values[k]!
}

/**
 * For each block of `blockLength` samples in buffer[0 … count−1], the median |step| from every
 * 8th step, written to out[firstBlock …]. Called by the streaming pass for each chunk.
 */
export function collectBlockStepMedians(
  buffer: Float32Array,
  count: number,
  blockLength: number,
  out: Float32Array,
  firstBlock: number,
  scratch: Float32Array,
): void {
  for (let blockStart = 0, block = firstBlock; blockStart < count; blockStart += blockLength, block++) {
    const blockEnd = Math.min(count, blockStart + blockLength)
    let m = 0
    for (let i = blockStart + 1; i < blockEnd; i += STEP_SUBSAMPLE) scratch[m++] = Math.abs(buffer[i]! - buffer[i - 1]!)
    out[block] = m > 0 ? selectKth(scratch, m, m >> 1) : 0
  }
}

/** Find the clicks from the pass' statistics, re-reading only frames that may hold one. */
export function findClicks(source: MonoSampleSource, pass: SurfacePass, options: ClickOptions = {}): ClickResult {
  const k = options.k ?? CLICK_DEFAULTS.k
  const deadTime = Math.round((options.deadTimeSeconds ?? CLICK_DEFAULTS.deadTimeSeconds) * source.sampleRate)
  const { frameLength, framesPerBlock, frameMaxStep, blockStepMedian } = pass
  const blocks = blockStepMedian.length
  const thresholdOfBlock = (b: number) => {
    const local = Math.max(blockStepMedian[b]!, b > 0 ? blockStepMedian[b - 1]! : 0, b + 1 < blocks ? blockStepMedian[b + 1]! : 0)
    return Math.max(k * local, CLICK_DEFAULTS.minimumThreshold)
  }

  const frame = new Float32Array(frameLength + 1)
  const timesS: number[] = []
  let count = 0
  let quietUntil = -1
  for (let f = 0; f < frameMaxStep.length; f++) {
    const threshold = thresholdOfBlock(Math.floor(f / framesPerBlock))
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
