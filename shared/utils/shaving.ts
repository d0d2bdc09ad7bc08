import { PLAN_STEPS_MAX } from './bounds'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'
import { formatInches } from './length'

/*
 * Shaving turns the blank under a cutter fed in by the in-feed wheel: 45° of wheel feeds the cutter
 * 0.003 in radially (common practice, no source), so a full turn feeds 0.024 in. Each pass takes the
 * in-feed off the radius, so the diameter falls by twice the in-feed per pass. A surface is clean once
 * the cut reaches the low spot: radial depth = (largest − smallest diameter read around the blank) ÷ 2.
 */

const SLACK = 1e-9
const DEGREES_PER_INFEED_STEP = 45

/** Radial in-feed per pass for a turn of the in-feed wheel, in inches. */
export function infeedPerPassIn(wheelDegrees: number, infeedPer45DegreesIn: number = defaultEngineSettings.shaving.infeedPer45DegreesIn): number {
  if (!(wheelDegrees > 0)) throw new RangeError(`the in-feed wheel must be turned more than 0°, got ${wheelDegrees}`)
  return (wheelDegrees / DEGREES_PER_INFEED_STEP) * infeedPer45DegreesIn
}

/** Wheel turn (degrees) that feeds the cutter `radialIn`. */
export function wheelDegreesForInfeed(radialIn: number, infeedPer45DegreesIn: number = defaultEngineSettings.shaving.infeedPer45DegreesIn): number {
  return (radialIn / infeedPer45DegreesIn) * DEGREES_PER_INFEED_STEP
}

export interface ShavingPlanInput {
  /** Largest diameter read around the blank (the high spot). */
  highDiameterIn: number
  /** Smallest diameter read around the blank; with the high one it gives the depth to clean up. */
  lowDiameterIn?: number | undefined
  /** Radial depth to clean up, when known directly (e.g. an old recording to remove). */
  depthToCleanUpIn?: number | undefined
  wheelDegrees?: number | undefined
  minimumDiameterIn?: number | undefined
  /** Radial depth one fresh surface costs, for counting the surfaces left. */
  perSurfaceIn?: number | undefined
}

export interface ShavingPass {
  pass: number
  diameterIn: number
}

export interface ShavingPlan {
  infeedIn: number
  depthToCleanUpIn: number
  passes: number
  /** Radial depth all passes take together (≥ the depth to clean up). */
  totalCutIn: number
  diameterAfterIn: number
  steps: ShavingPass[]
  minimumDiameterIn: number
  perSurfaceIn: number
  /** Further surfaces of `perSurfaceIn` each before the minimum diameter. */
  surfacesLeft: number
  warnings: string[]
}

function depthToCleanUp(input: ShavingPlanInput): number {
  if (input.depthToCleanUpIn !== undefined) {
    if (!(input.depthToCleanUpIn >= 0)) throw new RangeError(`depth to clean up cannot be negative, got ${input.depthToCleanUpIn}`)
    return input.depthToCleanUpIn
  }
  if (input.lowDiameterIn === undefined) throw new RangeError('give the smallest diameter read around the blank, or the depth to clean up')
  if (input.lowDiameterIn > input.highDiameterIn + SLACK) throw new RangeError('the high diameter must be at least the low diameter')
  return Math.max(0, (input.highDiameterIn - input.lowDiameterIn) / 2)
}

/**
 * Passes to a continuous cut, and what is left after. A shaving always takes at least one pass,
 * since even a round blank needs one cut for a fresh surface.
 */
export function shavingPlan(input: ShavingPlanInput, settings: EngineSettings = defaultEngineSettings): ShavingPlan {
  const { infeedPer45DegreesIn, maxCutPerPassIn } = settings.shaving
  const minimumDiameterIn = input.minimumDiameterIn ?? settings.shaving.minimumDiameterIn
  const perSurfaceIn = input.perSurfaceIn ?? settings.shaving.depthPerSurfaceIn
  if (!(input.highDiameterIn > 0)) throw new RangeError(`the high diameter must be more than 0 in, got ${input.highDiameterIn}`)
  if (!(perSurfaceIn > 0)) throw new RangeError(`the depth per surface must be more than 0 in, got ${perSurfaceIn}`)

  const infeedIn = infeedPerPassIn(input.wheelDegrees ?? DEGREES_PER_INFEED_STEP, infeedPer45DegreesIn)
  const depthIn = depthToCleanUp(input)
  // The slack keeps (2.200 − 2.194) ÷ 2 ÷ 0.003 at one pass, not two.
  const passes = Math.max(1, Math.ceil(depthIn / infeedIn - 1e-6))
  // A plan past PLAN_STEPS_MAX passes is a mistyped figure: it is said below, never listed pass by pass.
  const steps: ShavingPass[] = []
  if (passes <= PLAN_STEPS_MAX) {
    for (let pass = 1; pass <= passes; pass++) steps.push({ pass, diameterIn: input.highDiameterIn - 2 * pass * infeedIn })
  }
  const totalCutIn = passes * infeedIn
  const diameterAfterIn = input.highDiameterIn - 2 * totalCutIn
  const surfacesLeft = Math.max(0, Math.floor((diameterAfterIn - minimumDiameterIn) / (2 * perSurfaceIn) + 1e-6))

  const warnings: string[] = []
  if (passes > PLAN_STEPS_MAX) {
    warnings.push(`More than ${PLAN_STEPS_MAX} passes (${passes}) to clean up: check the figures (the diameters read and the wheel setting).`)
  }
  if (infeedIn > maxCutPerPassIn + SLACK) {
    warnings.push(`${formatInches(infeedIn, 4)} in per pass is deeper than the ${formatInches(maxCutPerPassIn, 4)} in on the radius that collectors' forum practice advises: turn the wheel no more than ${Math.round(wheelDegreesForInfeed(maxCutPerPassIn, infeedPer45DegreesIn))}° a pass.`)
  }
  if (depthIn > SLACK && infeedIn > depthIn + SLACK) {
    warnings.push(`One pass at ${formatInches(infeedIn, 4)} in cuts deeper than the ${formatInches(depthIn, 4)} in needed to clean up: about ${Math.ceil(wheelDegreesForInfeed(depthIn, infeedPer45DegreesIn) - 1e-6)}° of wheel is enough and saves wax for later surfaces.`)
  }
  if (diameterAfterIn < minimumDiameterIn - SLACK) {
    warnings.push(`This plan leaves the blank at ${formatInches(diameterAfterIn)} in, under the shop's minimum diameter of ${formatInches(minimumDiameterIn)} in: do not shave it; scrap or set it aside.`)
  }
  return { infeedIn, depthToCleanUpIn: depthIn, passes, totalCutIn, diameterAfterIn, steps, minimumDiameterIn, perSurfaceIn, surfacesLeft, warnings }
}
