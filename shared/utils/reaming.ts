import { PLAN_STEPS_MAX } from './bounds'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'
import { formatInches, formatLengthLabel } from './length'

/*
 * Reaming opens the tapered bore a little at a time, so the blank seats further along the mandrel.
 *
 * `overhangIn` is the shop's overhang reading, and it GROWS by about one reaming's travel (1/16 in) with
 * each reaming as the blank seats further on; `targetIn` is the reading of a finished fit (about 7/16 in).
 * The axial travel still needed is target − measured (the shop's reaming rule):
 *   3/16 in showing when 7/16 in is wanted → 4/16 in to go → 4 more reamings;
 *   a reading 15/16 in short of the target → 15 reamings.
 * A reading at the target is finished; a reading beyond it means the bore is already too big, and
 * reaming cannot take material back, so the plan refuses rather than suggest anything.
 */

const SLACK = 1e-9
/** Bench temperatures further than this from the reference make the reading unreliable. */
const FIT_TEMPERATURE_TOLERANCE_F = 5

/** `check_figures`: more reamings than any blank takes (over PLAN_STEPS_MAX): the figures are wrong, not the bore. */
export type ReamingPlanStatus = 'plan' | 'at_fit' | 'past_fit' | 'check_figures'

export interface ReamingPlanInput {
  overhangIn: number
  targetIn?: number | undefined
  perReamingIn?: number | undefined
  setSize?: number | undefined
  /** Temperature of the blank when the overhang was read, if known. */
  benchTemperatureF?: number | undefined
}

export interface ReamingStep {
  set: number
  afterReamings: number
  /** Expected reading after this set; never past the target. */
  overhangIn: number
}

export interface ReamingPlan {
  status: ReamingPlanStatus
  overhangIn: number
  targetIn: number
  perReamingIn: number
  setSize: number
  /** Target − measured; negative when already past the fit. */
  travelIn: number
  reamings: number
  sets: number
  steps: ReamingStep[]
  warnings: string[]
}

/**
 * Reamings to cover `travelIn`: the ceiling of travel ÷ travel per reaming, with a little slack so that
 * 15/16 ÷ 1/16 is 15, not 16 from a rounding crumb.
 */
export function reamingsForTravel(travelIn: number, perReamingIn: number): number {
  if (!(perReamingIn > 0)) throw new RangeError(`travel per reaming must be more than 0 in, got ${perReamingIn}`)
  if (!(travelIn > SLACK)) return 0
  return Math.ceil(travelIn / perReamingIn - SLACK)
}

function overReamingWarning(setSize: number): string {
  return `Over-reaming cannot be undone: check the fit on the mandrel after every set of ${setSize}.`
}

function temperatureWarning(benchTemperatureF: number | undefined, referenceF: number): string | undefined {
  if (benchTemperatureF === undefined || Math.abs(benchTemperatureF - referenceF) < FIT_TEMPERATURE_TOLERANCE_F) return undefined
  return benchTemperatureF > referenceF
    ? `Fit is judged at ${referenceF} °F; at ${benchTemperatureF} °F the warm bore has grown and the blank sits further along the mandrel than it will at room temperature. Let it cool before reading the overhang.`
    : `Fit is judged at ${referenceF} °F; at ${benchTemperatureF} °F the cold bore has shrunk and the blank sits short of where it will at room temperature, so reaming to this reading would over-ream. Let it warm before reading the overhang.`
}

export function reamingPlan(input: ReamingPlanInput, settings: EngineSettings = defaultEngineSettings): ReamingPlan {
  const targetIn = input.targetIn ?? settings.reaming.targetOverhangIn
  const perReamingIn = input.perReamingIn ?? settings.reaming.perReamingIn
  const setSize = input.setSize ?? settings.reaming.setSize
  if (!Number.isFinite(input.overhangIn) || !Number.isFinite(targetIn)) throw new RangeError('overhang and target must be finite lengths')
  if (!Number.isInteger(setSize) || setSize < 1) throw new RangeError(`set size must be a whole number of reamings, got ${setSize}`)

  const travelIn = targetIn - input.overhangIn
  const reamings = reamingsForTravel(travelIn, perReamingIn)
  const warnings: string[] = []
  const temperature = temperatureWarning(input.benchTemperatureF, settings.fit.referenceTemperatureF)
  if (temperature) warnings.push(temperature)

  const base = { overhangIn: input.overhangIn, targetIn, perReamingIn, setSize, travelIn }
  if (reamings === 0) {
    const pastFit = travelIn < -SLACK
    warnings.unshift(pastFit
      ? `The blank is already ${formatLengthLabel(-travelIn)} past the wanted fit: no reaming. Over-reaming cannot be undone; set this blank aside for the maker to judge.`
      : 'The blank is already at the wanted fit: no reaming needed.')
    return { ...base, status: pastFit ? 'past_fit' : 'at_fit', reamings: 0, sets: 0, steps: [], warnings }
  }

  const sets = Math.ceil(reamings / setSize)
  if (reamings > PLAN_STEPS_MAX) {
    // No blank takes this many: a reading or a setting is mistyped. Said, not listed, so no figure can make the plan endless.
    warnings.unshift(`More than ${PLAN_STEPS_MAX} reamings (${reamings}) to the wanted fit: check the figures (the overhang reading, the target and the travel per reaming).`)
    return { ...base, status: 'check_figures', reamings, sets, steps: [], warnings }
  }
  const steps: ReamingStep[] = []
  for (let set = 1; set <= sets; set++) {
    const afterReamings = Math.min(set * setSize, reamings)
    steps.push({ set, afterReamings, overhangIn: Math.min(input.overhangIn + afterReamings * perReamingIn, targetIn) })
  }
  warnings.push(overReamingWarning(setSize))
  const lastReamingIn = travelIn - (reamings - 1) * perReamingIn
  if (lastReamingIn < perReamingIn - SLACK) {
    warnings.push(`The last reaming needs only about ${formatInches(lastReamingIn)} in of travel: ream it lightly and check the fit before going on.`)
  }
  return { ...base, status: 'plan', reamings, sets, steps, warnings }
}
