// Power spectra through fft.js, with the FFT objects (twiddle tables) cached per size.
import FFT from 'fft.js'

const fftCache = new Map<number, { fft: FFT, out: Float64Array }>()

export function nextPowerOfTwo(n: number): number {
  let size = 2
  while (size < n) size *= 2
  return size
}

const hannCache = new Map<number, Float64Array>()

/** Periodic Hann window of a power-of-two length (cached: there are only a few such sizes). */
export function hannWindow(length: number): Float64Array {
  if (length & (length - 1)) throw new RangeError('hannWindow: the length must be a power of two')
  const cached = hannCache.get(length)
  if (cached) return cached
  const window = new Float64Array(length)
  for (let i = 0; i < length; i++) window[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / length)
  hannCache.set(length, window)
  return window
}

/**
 * |X_k|² for k = 0 … size/2 of a real input of length `size` (already windowed and padded),
 * added into `accumulator` (so Welch averaging is a loop of calls).
 */
export function addPowerSpectrum(input: Float64Array, accumulator: Float64Array): void {
  const size = input.length
  let entry = fftCache.get(size)
  if (!entry) {
    entry = { fft: new FFT(size), out: new Float64Array(2 * size) }
    fftCache.set(size, entry)
  }
  const { fft, out } = entry
  fft.realTransform(out, input)
  for (let k = 0; k <= size / 2; k++) {
    const re = out[2 * k]!
    const im = out[2 * k + 1]!
    accumulator[k] = accumulator[k]! + re * re + im * im
  }
}
