// Once-per-turn (rotary) noise: how strongly the level of the surface noise rises and falls in
// step with the rotation of the mandrel.
//
// Method:
//  1. The level envelope: A-weighted energy in 10 ms frames (100 frames/s), in dB. Working in dB
//     makes the measure independent of the overall level and squashes the odd click. Frames more
//     than 30 dB under the median level (silence before the stylus is down) are raised to that.
//  2. A 5-frame running median removes single-frame spikes (clicks) without touching a swell
//     whose period is 375 ms or more.
//  3. Remove the mean and the linear trend (a level that drifts across the cylinder is not
//     rotary noise), apply a Hann window, zero-pad to ≥ 2× the length and take the power spectral
//     density S(f) (dB²/Hz, one-sided, scaled so that ∫S df is the mean square).
//  4. The fundamental: the strongest bin within ±6 % of f0 = rpm/60 (real machines run a little
//     off their nominal speed), giving f̂. Lines: the Hann main lobe (±2 resolution bins) around
//     f̂, 2f̂ and 3f̂.
//  5. The rest of the fluctuation: S over 0.5–20 Hz with the lobes of every harmonic k·f̂
//     excluded, taken as median/ln 2 (the mean of an exponentially distributed periodogram,
//     robust to stray peaks).
//  6. rotaryDb = 10·log10(power in the three lines / (rest-PSD × 1 Hz)): the once-per-turn
//     component against the other level fluctuation in a 1 Hz band. Referring to a fixed 1 Hz
//     band keeps it independent of the recording's length for a real swell. Measured on synthetic
//     white surface noise (10 ms frames; 30, 60 and 150 s all agree within 0.5 dB):
//       swing (peak to peak)  none   0.17 dB  0.5 dB  1.0 dB  1.7 dB  3.5 dB
//       rotaryDb              −4…+1  ≈ +5     ≈ +14   ≈ +20   ≈ +24   ≈ +29
//     Softer (low-passed) noise has a livelier envelope and reads about 2 dB lower.
//  7. Detected when the fundamental's peak bin stands ≥ 13 dB (×20) above the rest-PSD: for
//     noise alone that happens with probability e⁻²⁰ per independent bin. Detection is sensitive
//     (a 0.17 dB swing is found); whether it matters is for the thresholds on rotaryDb.
//  rotarySwingDb: the peak-to-peak swing of a sinusoid carrying the lines' power less the noise
//  expected in them; it follows the true level swing within a few per cent (see the tests).
import { addPowerSpectrum, nextPowerOfTwo } from './fftPower'

export interface RotaryMeasure {
  rotaryDb: number | null
  rotaryHz: number | null
  rotaryDetected: boolean
  rotarySwingDb: number | null
}

const SEARCH_FRACTION = 0.06
const DETECTION_RATIO = 20
const BAND_LOW_HZ = 0.5
const BAND_HIGH_HZ = 20
/** Fewer rotations than this and there is no spectrum to speak of. */
export const MIN_ROTATIONS_FOR_ROTARY = 10

function median(values: Float64Array | number[]): number {
  const sorted = Float64Array.from(values).sort()
  const mid = sorted.length >> 1
  return sorted.length % 2 ? sorted[mid]! : 0.5 * (sorted[mid - 1]! + sorted[mid]!)
}

/** Median of five values with a fixed handful of comparisons (no allocation). */
function medianOf5(v0: number, v1: number, v2: number, v3: number, v4: number): number {
  // Order the pairs (a ≤ b) and (c ≤ d) and swap them so that a ≤ c; then a is the smallest of
  // the four and cannot be the median of five, which is therefore the 2nd smallest of b, c, d, e.
  const a = Math.min(v0, v1)
  let b = Math.max(v0, v1)
  let c = Math.min(v2, v3)
  let d = Math.max(v2, v3)
  if (c < a) {
    const otherHigh = d
    c = a
    d = b
    b = otherHigh
  }
  const low = Math.min(b, v4)
  const high = Math.max(b, v4)
  // Two ordered pairs (low ≤ high) and (c ≤ d): the 2nd smallest of the four.
  return low < c ? Math.min(high, c) : Math.min(low, d)
}

/** Running median over five frames, edges repeated. */
function medianOfFive(input: Float64Array): Float64Array {
  const n = input.length
  const out = new Float64Array(n)
  const at = (i: number) => input[Math.min(n - 1, Math.max(0, i))]!
  for (let i = 0; i < n; i++) out[i] = medianOf5(at(i - 2), at(i - 1), input[i]!, at(i + 1), at(i + 2))
  return out
}

/**
 * @param frameEnergy sum of squares per complete frame (A-weighted)
 * @param frameLength samples per frame
 * @param frameRate frames per second
 */
export function measureRotary(frameEnergy: Float64Array, frameLength: number, frameRate: number, rpm: number): RotaryMeasure {
  const none: RotaryMeasure = { rotaryDb: null, rotaryHz: null, rotaryDetected: false, rotarySwingDb: null }
  const f0 = rpm / 60
  const frames = frameEnergy.length
  const seconds = frames / frameRate
  if (seconds * f0 < MIN_ROTATIONS_FOR_ROTARY || frameRate / 2 <= 3 * f0 * (1 + SEARCH_FRACTION)) return none

  const levelDb = new Float64Array(frames)
  for (let i = 0; i < frames; i++) levelDb[i] = 10 * Math.log10(frameEnergy[i]! / frameLength + 1e-20)
  // Stretches of (near) digital silence, e.g. before the stylus is set down, would otherwise be
  // deep holes in a dB envelope and smear over the whole spectrum: floor them 30 dB under the
  // typical level.
  const floorDb = median(levelDb) - 30
  for (let i = 0; i < frames; i++) levelDb[i] = Math.max(levelDb[i]!, floorDb)
  const envelope = medianOfFive(levelDb)

  // Remove mean and linear trend (least squares against a centred time axis).
  let mean = 0
  for (let i = 0; i < frames; i++) mean += envelope[i]!
  mean /= frames
  const centre = (frames - 1) / 2
  let slopeNumerator = 0
  let slopeDenominator = 0
  for (let i = 0; i < frames; i++) {
    slopeNumerator += (i - centre) * (envelope[i]! - mean)
    slopeDenominator += (i - centre) * (i - centre)
  }
  const slope = slopeDenominator > 0 ? slopeNumerator / slopeDenominator : 0

  const size = nextPowerOfTwo(2 * frames)
  const windowed = new Float64Array(size)
  let windowPower = 0
  for (let i = 0; i < frames; i++) {
    const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / frames)
    windowed[i] = w * (envelope[i]! - mean - slope * (i - centre))
    windowPower += w * w
  }
  const power = new Float64Array(size / 2 + 1)
  addPowerSpectrum(windowed, power)
  const binHz = frameRate / size
  const psdScale = 2 / (frameRate * windowPower)
  for (let k = 0; k < power.length; k++) power[k] = power[k]! * psdScale

  const binOf = (f: number) => Math.round(f / binHz)
  let peakBin = binOf(f0 * (1 - SEARCH_FRACTION))
  for (let k = peakBin, last = binOf(f0 * (1 + SEARCH_FRACTION)); k <= last; k++) {
    if (power[k]! > power[peakBin]!) peakBin = k
  }
  const fundamentalHz = peakBin * binHz
  const lobeBins = Math.ceil((2 * size) / frames)

  const highHz = Math.min(BAND_HIGH_HZ, frameRate / 2 - binHz)
  const rest: number[] = []
  for (let k = binOf(BAND_LOW_HZ), last = binOf(highHz); k <= last; k++) {
    const harmonic = Math.max(1, Math.round((k * binHz) / fundamentalHz))
    if (Math.abs(k - harmonic * (fundamentalHz / binHz)) <= lobeBins) continue
    rest.push(power[k]!)
  }
  if (rest.length < 8) return none
  const restPsd = median(rest) / Math.LN2
  if (!(restPsd > 0)) return none

  let linePower = 0
  let lineBins = 0
  for (let harmonic = 1; harmonic <= 3; harmonic++) {
    const centreBin = Math.round((harmonic * fundamentalHz) / binHz)
    for (let k = centreBin - lobeBins; k <= centreBin + lobeBins; k++) {
      if (k < 0 || k >= power.length) continue
      linePower += power[k]! * binHz
      lineBins++
    }
  }
  const rotaryDb = 10 * Math.log10(Math.max(linePower, 1e-12 * restPsd) / restPsd)
  const rotaryDetected = power[peakBin]! >= DETECTION_RATIO * restPsd
  const swellPower = Math.max(0, linePower - restPsd * lineBins * binHz)
  return {
    rotaryDb,
    rotaryHz: rotaryDetected ? fundamentalHz : null,
    rotaryDetected,
    rotarySwingDb: 2 * Math.sqrt(2 * swellPower),
  }
}
