// IEC 61672-1 A-weighting: the analytic curve and a digital filter that follows it at any sample
// rate we accept (22.05–96 kHz).
//
// Why not the textbook bilinear transform: it squeezes the whole analog axis into 0…fs/2, so at
// 44.1 kHz the response at 10 kHz is the analog one at 12.1 kHz — 1.5 dB short — and at 16 kHz
// it is 8.5 dB short.
//
// The design used here, computed per sample rate (a few ms, cached):
//   * the four zeros at s = 0 map exactly to z = 1;
//   * every pole maps by the matched-z rule p = exp(−2π·f·T): exact pole positions, no warping;
//   * what matched-z gets wrong is the magnitude towards Nyquist (a digital response cannot keep
//     falling like the analog 1/f² tail), so a fourth-order numerator is fitted: its squared
//     magnitude c0 + 2c1·cos ω + … + 2c4·cos 4ω is linear in c, so weighted linear least squares
//     on the relative error over 20 Hz … min(20 kHz, 0.98·fs/2), re-weighted towards equal ripple
//     (Lawson), pinned at 1 kHz, then spectrally factored (w = z + 1/z turns the palindromic
//     polynomial into a quartic) into minimum-phase zeros, two per section.
// Result: four biquads — two low-cut sections (numerator 1 − 2z⁻¹ + z⁻²), the 12.2 kHz double pole
// with two fitted zeros, and two more fitted zeros — with 1 kHz at exactly 0 dB.
//
// Accuracy against the analytic curve, 10 Hz … 20 kHz (checked in tests/unit/audio-aweighting.test.ts):
//   44.1 kHz ±0.04 dB, 48 kHz ±0.01 dB, 88.2/96 kHz ±0.001 dB (up to 20 kHz);
//   32 kHz ±0.13 dB and 22.05 kHz ±0.10 dB up to 0.98·Nyquist, where the analog curve is still
//   falling steeply and a sixth-order recursive filter can only approximate it.
// So at 44.1 kHz even 16 kHz (0.72 of Nyquist) is within the ±0.1 dB held at the other points.
// Above 20 kHz (at 48 kHz and up) the fit is not asked to follow the curve; there the
// weighting is below −9 dB and the deviation reaches about 2 dB right at Nyquist.

/** IEC 61672-1 Annex E pole frequencies in Hz. */
export const A_WEIGHTING_POLES_HZ = {
  f1: 20.598997,
  f2: 107.65265,
  f3: 737.86223,
  f4: 12194.217,
} as const

const { f1, f2, f3, f4 } = A_WEIGHTING_POLES_HZ

function aWeightingUnnormalisedPower(f: number): number {
  const f2sq = f * f
  const num = f4 * f4 * f2sq * f2sq
  const den = (f2sq + f1 * f1) * Math.sqrt((f2sq + f2 * f2) * (f2sq + f3 * f3)) * (f2sq + f4 * f4)
  const amplitude = num / den
  return amplitude * amplitude
}

const A1000_POWER = aWeightingUnnormalisedPower(1000)

/** Analytic A-weighting in dB at frequency f (Hz), 0 dB at 1 kHz (IEC 61672-1 Annex E). */
export function aWeightingDb(f: number): number {
  if (!(f > 0)) return Number.NEGATIVE_INFINITY
  return 10 * Math.log10(aWeightingUnnormalisedPower(f) / A1000_POWER)
}

/** Analytic A-weighting as a power gain (linear, 1 at 1 kHz). */
export function aWeightingPowerGain(f: number): number {
  if (!(f > 0)) return 0
  return aWeightingUnnormalisedPower(f) / A1000_POWER
}

/** One biquad in direct form: y = (b0 + b1 z⁻¹ + b2 z⁻²) / (1 + a1 z⁻¹ + a2 z⁻²) · x */
export interface Biquad {
  b0: number
  b1: number
  b2: number
  a1: number
  a2: number
}

export interface AWeightingFilter {
  sampleRate: number
  sections: [Biquad, Biquad, Biquad, Biquad]
}

function biquadPowerAt(section: Biquad, omega: number): number {
  const c1 = Math.cos(omega)
  const s1 = Math.sin(omega)
  const c2 = Math.cos(2 * omega)
  const s2 = Math.sin(2 * omega)
  const nr = section.b0 + section.b1 * c1 + section.b2 * c2
  const ni = -(section.b1 * s1 + section.b2 * s2)
  const dr = 1 + section.a1 * c1 + section.a2 * c2
  const di = -(section.a1 * s1 + section.a2 * s2)
  return (nr * nr + ni * ni) / (dr * dr + di * di)
}

function cascadePowerAt(sections: readonly Biquad[], f: number, sampleRate: number): number {
  const omega = (2 * Math.PI * f) / sampleRate
  let power = 1
  for (const section of sections) power *= biquadPowerAt(section, omega)
  return power
}

/** Solve the n×n system m·x = v by Gaussian elimination with partial pivoting. */
function solveLinear(m: number[][], v: number[]): number[] {
  const n = v.length
  const a = m.map((row, i) => [...row, v[i] ?? 0])
  for (let col = 0; col < n; col++) {
    let pivot = col
    for (let row = col + 1; row < n; row++) {
      if (Math.abs(a[row]![col]!) > Math.abs(a[pivot]![col]!)) pivot = row
    }
    const swap = a[col]!
    a[col] = a[pivot]!
    a[pivot] = swap
    const p = a[col]![col]!
    for (let row = col + 1; row < n; row++) {
      const factor = a[row]![col]! / p
      for (let k = col; k <= n; k++) a[row]![k]! -= factor * a[col]![k]!
    }
  }
  const x = new Array<number>(n).fill(0)
  for (let row = n - 1; row >= 0; row--) {
    let sum = a[row]![n]!
    for (let k = row + 1; k < n; k++) sum -= a[row]![k]! * x[k]!
    x[row] = sum / a[row]![row]!
  }
  return x
}

interface Complex {
  re: number
  im: number
}

const cmul = (a: Complex, b: Complex): Complex => ({ re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re })
const cdiv = (a: Complex, b: Complex): Complex => {
  const d = b.re * b.re + b.im * b.im
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d }
}
const csqrt = (a: Complex): Complex => {
  const mod = Math.hypot(a.re, a.im)
  const re = Math.sqrt(Math.max(0, (mod + a.re) / 2))
  const im = Math.sqrt(Math.max(0, (mod - a.re) / 2))
  return { re, im: a.im < 0 ? -im : im }
}

/** All roots of a monic polynomial (coefficients highest power first, leading 1 omitted): Durand–Kerner. */
function polynomialRoots(coefficients: number[]): Complex[] {
  const degree = coefficients.length
  const evaluate = (z: Complex): Complex => {
    let value: Complex = { re: 1, im: 0 }
    for (const c of coefficients) value = { re: cmul(value, z).re + c, im: cmul(value, z).im }
    return value
  }
  const seed: Complex = { re: 0.4, im: 0.9 }
  let roots: Complex[] = []
  let power: Complex = { re: 1, im: 0 }
  for (let i = 0; i < degree; i++) {
    power = cmul(power, seed)
    roots.push(power)
  }
  for (let iteration = 0; iteration < 500; iteration++) {
    let change = 0
    roots = roots.map((root, i) => {
      let denominator: Complex = { re: 1, im: 0 }
      roots.forEach((other, j) => {
        if (j !== i) denominator = cmul(denominator, { re: root.re - other.re, im: root.im - other.im })
      })
      const step = cdiv(evaluate(root), denominator)
      change = Math.max(change, Math.hypot(step.re, step.im))
      return { re: root.re - step.re, im: root.im - step.im }
    })
    if (change < 1e-15) break
  }
  return roots
}

/** The root of z² − w·z + 1 = 0 that lies inside (or on) the unit circle. */
function innerRootOf(w: Complex): Complex {
  const root = csqrt({ re: w.re * w.re - w.im * w.im - 4, im: 2 * w.re * w.im })
  const plus = { re: (w.re + root.re) / 2, im: (w.im + root.im) / 2 }
  const minus = { re: (w.re - root.re) / 2, im: (w.im - root.im) / 2 }
  return Math.hypot(plus.re, plus.im) <= Math.hypot(minus.re, minus.im) ? plus : minus
}

/**
 * Turn a fitted squared magnitude c0 + 2c1·cos ω + … + 2c4·cos 4ω into the zeros of a real
 * minimum-phase numerator of order four, as two second-order numerators.
 */
function factorFourthOrderNumerator(c: number[]): [[number, number, number], [number, number, number]] {
  const [c0 = 0, c1 = 0, c2 = 0, c3 = 0, c4 = 0] = c
  // With w = z + 1/z: z^k + z^−k is w, w² − 2, w³ − 3w, w⁴ − 4w² + 2, so the palindromic
  // polynomial in z becomes a quartic in w.
  const quartic = [c3 / c4, (c2 - 4 * c4) / c4, (c1 - 3 * c3) / c4, (c0 - 2 * c2 + 2 * c4) / c4]
  const zeros = polynomialRoots(quartic).map(innerRootOf)
  // Pair conjugates together and real zeros with each other so each pair has real coefficients.
  const complexZeros = zeros.filter(z => z.im > 1e-12)
  const realZeros = zeros.filter(z => Math.abs(z.im) <= 1e-12).map(z => z.re).sort((a, b) => a - b)
  const pairs: [number, number, number][] = complexZeros.map(z => [1, -2 * z.re, z.re * z.re + z.im * z.im])
  for (let i = 0; i + 1 < realZeros.length; i += 2) {
    const a = realZeros[i]!
    const b = realZeros[i + 1]!
    pairs.push([1, -(a + b), a * b])
  }
  const first = pairs[0]
  const second = pairs[1]
  if (!first || !second || pairs.length !== 2) throw new Error('A-weighting design: could not factor the numerator')
  return [first, second]
}

const NUMERATOR_ORDER = 4
const designCache = new Map<number, AWeightingFilter>()

/** Design (and cache) the A-weighting filter for a sample rate; see the comment at the top. */
export function designAWeightingFilter(sampleRate: number): AWeightingFilter {
  const cached = designCache.get(sampleRate)
  if (cached) return cached

  const pole = (f: number) => Math.exp((-2 * Math.PI * f) / sampleRate)
  const p1 = pole(f1)
  const p2 = pole(f2)
  const p3 = pole(f3)
  const p4 = pole(f4)

  // levels.ts relies on the two low-cut sections having exactly the numerator 1 − 2z⁻¹ + z⁻²
  // and on the last section having no poles.
  const lowCut1: Biquad = { b0: 1, b1: -2, b2: 1, a1: -2 * p1, a2: p1 * p1 }
  const lowCut2: Biquad = { b0: 1, b1: -2, b2: 1, a1: -(p2 + p3), a2: p2 * p3 }
  const highPoles: Biquad = { b0: 1, b1: 0, b2: 0, a1: -2 * p4, a2: p4 * p4 }

  // Weighted least squares for |N|² = target / |rest|² on the relative error at log-spaced
  // points, re-weighted (Lawson's iteration) so that the largest errors, which sit near the top
  // of the band, shrink towards an equal-ripple fit.
  const top = Math.min(20000, 0.98 * (sampleRate / 2))
  const bottom = 20
  const points = 240
  const terms = NUMERATOR_ORDER + 1
  const basisAt: number[][] = []
  // The last point is 1 kHz itself with a fixed heavy weight, so the fit passes through the
  // reference frequency and normalising the gain there does not tilt the error curve.
  const frequencies = Array.from({ length: points }, (_, i) => bottom * Math.pow(top / bottom, i / (points - 1)))
  frequencies.push(1000)
  for (const f of frequencies) {
    const omega = (2 * Math.PI * f) / sampleRate
    const rest = cascadePowerAt([lowCut1, lowCut2, highPoles], f, sampleRate)
    const wanted = aWeightingPowerGain(f) / rest
    // Residual (φ·c)/wanted − 1, so the basis is scaled by 1/wanted.
    basisAt.push(Array.from({ length: terms }, (_, k) => (k === 0 ? 1 : 2 * Math.cos(k * omega)) / wanted))
  }
  const referenceWeight = 10
  let weights = new Array<number>(points).fill(1 / points)
  weights.push(referenceWeight)
  let fitted: number[] = []
  for (let iteration = 0; iteration < 20; iteration++) {
    const normal = Array.from({ length: terms }, () => new Array<number>(terms).fill(0))
    const rhs = new Array<number>(terms).fill(0)
    basisAt.forEach((basis, i) => {
      const weight = weights[i]!
      for (let r = 0; r < terms; r++) {
        rhs[r]! += weight * basis[r]!
        for (let c = 0; c < terms; c++) normal[r]![c]! += weight * basis[r]! * basis[c]!
      }
    })
    fitted = solveLinear(normal, rhs)
    weights = basisAt.map((basis, i) => {
      const fit = basis.reduce((sum, value, k) => sum + value * fitted[k]!, 0)
      return weights[i]! * (Math.abs(fit - 1) + 1e-12)
    })
    const weightSum = weights.reduce((a, b) => a + b, 0) - weights[points]!
    weights = weights.map((w, i) => (i === points ? referenceWeight : w / weightSum))
  }
  const [zerosA, zerosB] = factorFourthOrderNumerator(fitted)
  highPoles.b0 = zerosA[0]
  highPoles.b1 = zerosA[1]
  highPoles.b2 = zerosA[2]
  const shelf: Biquad = { b0: zerosB[0], b1: zerosB[1], b2: zerosB[2], a1: 0, a2: 0 }

  const sections: [Biquad, Biquad, Biquad, Biquad] = [lowCut1, lowCut2, highPoles, shelf]
  const gain = 1 / Math.sqrt(cascadePowerAt(sections, 1000, sampleRate))
  shelf.b0 *= gain
  shelf.b1 *= gain
  shelf.b2 *= gain

  const filter: AWeightingFilter = { sampleRate, sections }
  // Uploads come in a handful of rates; a bound keeps odd ones from piling up.
  if (designCache.size >= 32) designCache.clear()
  designCache.set(sampleRate, filter)
  return filter
}

/** The digital filter's actual magnitude response in dB at f for a sample rate (for the tests). */
export function aWeightingFilterResponseDb(f: number, sampleRate: number): number {
  const filter = designAWeightingFilter(sampleRate)
  return 10 * Math.log10(cascadePowerAt(filter.sections, f, sampleRate))
}
