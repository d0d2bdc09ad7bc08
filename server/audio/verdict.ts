// The maker's limits for a surface test and the verdict they give.
import { z } from 'zod'

interface LimitRange { min: number, max: number, unit: string }

const limitPair = (marginal: number, fail: number, what: string, range: LimitRange) => {
  const limit = z
    .number({ error: 'Enter a number.' })
    .min(range.min, `Enter ${range.min} ${range.unit} or more.`)
    .max(range.max, `Enter ${range.max} ${range.unit} or less.`)
  return z
    .object({ marginal: limit, fail: limit })
    .refine(pair => pair.marginal <= pair.fail, { path: ['fail'], message: `${what}: the fail limit must not be below the marginal limit.` })
    .prefault({ marginal, fail })
}

/**
 * Limits set by the maker (shop settings). For each measure, higher is worse: above `marginal`
 * the surface is marginal, above `fail` it fails. The defaults are shop choices — common
 * practice, no source:
 *  - A-weighted surface noise: marginal above −50 dBFS, fail above −44 dBFS (relative to the
 *    shop's fixed playback and recording gain, which is what makes tests comparable);
 *  - once-per-turn strength (rotaryDb, see rotary.ts): marginal above 15 dB, fail above 25 dB
 *    (on steady noise about a 0.5 dB and a 2 dB peak-to-peak swell per turn);
 *  - clicks: marginal above 6 per minute, fail above 15 per minute.
 */
export const surfaceThresholdsSchema = z
  .object({
    aWeightedDbfs: limitPair(-50, -44, 'A-weighted level', { min: -120, max: 0, unit: 'dBFS' }),
    rotaryDb: limitPair(15, 25, 'Once-per-turn strength', { min: 0, max: 80, unit: 'dB' }),
    clicksPerMinute: limitPair(6, 15, 'Clicks per minute', { min: 0, max: 600, unit: 'per minute' }),
    /**
     * Share of the format's playing time (at the test speed) a play-through must cover to be judged;
     * a shorter take is stored as incomplete. A shop choice, common practice, no source.
     */
    coveragePercent: z.number({ error: 'Enter a number.' }).min(1, 'Enter 1 % or more.').max(100, 'Enter 100 % or less.').default(90),
    /** A pass older than this many days is stale: the blank is tested again before it is cut. A shop choice. */
    passMaxAgeDays: z.number({ error: 'Enter a number.' }).int('Enter whole days.').min(1, 'Enter 1 day or more.').max(3650, 'Enter 3650 days or less.').default(90),
  })
  .prefault({})

export type SurfaceThresholds = z.output<typeof surfaceThresholdsSchema>
export type SurfaceThresholdsInput = z.input<typeof surfaceThresholdsSchema>

export type SurfaceVerdict = 'pass' | 'marginal' | 'fail'

/** What a stored test's verdict may also be: a play-through too short to cover the surface. */
export type StoredSurfaceVerdict = SurfaceVerdict | 'incomplete'

/**
 * How much of the surface a play-through covers: its length against the format's playing time at the
 * test speed (recorded length × grooves per inch ÷ rpm, `playingTimeMinutes` in shared/utils/cylinder.ts).
 */
export function surfaceCoverage(durationS: number, playingTimeS: number, coveragePercent: number) {
  const percent = playingTimeS > 0 ? Math.min(100, (durationS / playingTimeS) * 100) : 0
  return { durationS, playingTimeS, percent, required: coveragePercent, complete: percent + 1e-9 >= coveragePercent }
}

const clock = (seconds: number) => {
  const whole = Math.round(seconds)
  const minutes = Math.floor(whole / 60)
  const rest = whole % 60
  return minutes > 0 ? `${minutes} min${rest ? ` ${rest} s` : ''}` : `${rest} s`
}

/** Why a short take is incomplete, in the maker's words. */
export function incompleteCoverageReason(coverage: { durationS: number, playingTimeS: number, percent: number, required: number }): string {
  return `${clock(coverage.durationS)} covers ${Math.floor(coverage.percent)} % of the ${clock(coverage.playingTimeS)} surface (at least ${coverage.required} % is needed); play it through to the end.`
}

export interface VerdictInputs {
  aWeightedDbfs: number
  rotaryDb: number | null
  rotaryHz: number | null
  clicksPerMinute: number
  peakDbfs: number
  durationS: number
  minimumRotarySeconds: number
}

/** Below this sample peak the upload is taken as a recording of nothing (no signal reached it). */
export const SILENCE_PEAK_DBFS = -100

const format = (value: number, digits = 1) => value.toFixed(digits).replace('-', '−')

export function judgeSurface(inputs: VerdictInputs, thresholds: SurfaceThresholds): { verdict: SurfaceVerdict, reasons: string[] } {
  const reasons: string[] = []
  let verdict: SurfaceVerdict = 'pass'
  const raise = (to: SurfaceVerdict) => {
    if (to === 'fail' || (to === 'marginal' && verdict === 'pass')) verdict = to
  }
  const check = (value: number, limits: { marginal: number, fail: number }, describe: (limitWord: string, limit: number) => string) => {
    if (value > limits.fail) {
      raise('fail')
      reasons.push(describe('fail', limits.fail))
    }
    else if (value > limits.marginal) {
      raise('marginal')
      reasons.push(describe('marginal', limits.marginal))
    }
  }

  const silent = inputs.peakDbfs <= SILENCE_PEAK_DBFS
  if (silent) {
    raise('fail')
    reasons.push(`The recording is silent (peak ${format(inputs.peakDbfs)} dBFS): check the pickup and the recording level, then record the play-through again.`)
  }

  check(
    inputs.aWeightedDbfs,
    thresholds.aWeightedDbfs,
    (word, limit) => `Surface noise is ${format(inputs.aWeightedDbfs)} dBFS A-weighted, above the ${word} limit of ${format(limit)} dBFS.`,
  )

  if (inputs.rotaryDb === null) {
    if (!silent) {
      raise('marginal')
      reasons.push(
        inputs.durationS < inputs.minimumRotarySeconds
          ? `The recording is too short (${format(inputs.durationS)} s) to judge once-per-turn noise; record at least ${Math.ceil(inputs.minimumRotarySeconds)} s of the play-through.`
          : 'Once-per-turn noise could not be measured: the level of this recording does not vary at all, which a real surface never does.',
      )
    }
  }
  else {
    const rotaryDb = inputs.rotaryDb
    const at = inputs.rotaryHz !== null ? ` at ${format(inputs.rotaryHz, 2)} Hz` : ''
    check(rotaryDb, thresholds.rotaryDb, (word, limit) => `Once-per-turn noise${at} is ${format(rotaryDb)} dB, above the ${word} limit of ${format(limit)} dB.`)
  }

  check(
    inputs.clicksPerMinute,
    thresholds.clicksPerMinute,
    (word, limit) => `${format(inputs.clicksPerMinute)} clicks per minute, above the ${word} limit of ${format(limit)} per minute.`,
  )

  if (verdict === 'pass') reasons.push('Surface noise, once-per-turn noise and clicks are all within the shop\'s limits.')
  return { verdict, reasons }
}
