// The averaged spectrum for the plot, on 1/3-octave bands (base-10 centres 1000·10^(n/10) Hz,
// 20 Hz … 20 kHz, as far as the sample rate allows).
//
// Welch's method with a Hann window: segments of about a third of a second (16384 samples at
// 44.1/48 kHz, ≈ 2.7 Hz resolution, so even the 20 Hz band spans two bins), power spectra averaged.
// To keep the analysis fast, at most MAX_SEGMENTS segments are taken, spread evenly over the
// whole recording rather than overlapping end to end (a 150 s file has ~800 half-overlapping
// segments; FFT-ing them all would take longer than the rest of the analysis). For surface noise
// the average of 24 segments is within a fraction of a dB of the average of all of them (each
// 1/3-octave band sums many bins), and this is a plot, not a measurement the verdict uses.
// Band levels follow the AES17 convention (a full-scale sine inside a band reads 0 dB).
import { addPowerSpectrum, hannWindow, nextPowerOfTwo } from './fftPower'
import type { MonoSampleSource } from './decode'
import { AES17_RMS_OFFSET_DB, toDb } from './levels'

export interface SpectrumBand {
  hz: number
  db: number
}

export const MAX_SEGMENTS = 24

export function thirdOctaveCentres(sampleRate: number): number[] {
  const nyquist = sampleRate / 2
  const centres: number[] = []
  for (let n = -17; n <= 13; n++) {
    const centre = 1000 * Math.pow(10, n / 10)
    if (centre * Math.pow(10, 1 / 20) <= nyquist * 1.02) centres.push(centre)
  }
  return centres
}

export function measureSpectrum(source: MonoSampleSource): SpectrumBand[] {
  const { sampleRate, frames } = source
  let size = nextPowerOfTwo(sampleRate / 3)
  while (size > frames && size > 256) size /= 2
  const window = hannWindow(size)
  let windowPower = 0
  for (let i = 0; i < size; i++) windowPower += window[i]! * window[i]!
  const power = new Float64Array(size / 2 + 1)
  const raw = new Float32Array(size)
  const segment = new Float64Array(size)

  const available = Math.max(1, Math.floor((frames - size) / (size / 2)) + 1)
  const segments = Math.min(MAX_SEGMENTS, available)
  const lastStart = Math.max(0, frames - size)
  for (let s = 0; s < segments; s++) {
    const start = segments > 1 ? Math.round((s * lastStart) / (segments - 1)) : 0
    const count = Math.min(size, frames - start)
    raw.fill(0)
    source.readMono(start, count, raw)
    for (let i = 0; i < size; i++) segment[i] = raw[i]! * window[i]!
    addPowerSpectrum(segment, power)
  }
  // Scale so that the sum over bins is the mean square (one-sided; DC and Nyquist once).
  const scale = 2 / (segments * size * windowPower)
  const binHz = sampleRate / size

  return thirdOctaveCentres(sampleRate).map((centre) => {
    const low = centre * Math.pow(10, -1 / 20)
    const high = Math.min(centre * Math.pow(10, 1 / 20), sampleRate / 2)
    // Each bin covers [k − ½, k + ½]·binHz; count the part of it inside the band.
    let bandPower = 0
    for (let k = Math.max(1, Math.floor(low / binHz)); k <= Math.min(size / 2, Math.ceil(high / binHz)); k++) {
      const overlap = Math.min(high, (k + 0.5) * binHz) - Math.max(low, (k - 0.5) * binHz)
      if (overlap > 0) bandPower += power[k]! * scale * (overlap / binHz)
    }
    return { hz: Math.round(centre * 10) / 10, db: Math.round((toDb(bandPower) + AES17_RMS_OFFSET_DB) * 100) / 100 }
  })
}
