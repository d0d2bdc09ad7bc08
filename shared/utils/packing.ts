import { standardBlankDimensions } from './cylinder'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings, PackingBox, PackingTube } from './engineSettings'
import { GRAMS_PER_POUND, inchesToMillimetres } from './unitFormat'
import type { UnitPreferences } from './unitFormat'
import { countOf } from './wording'

/*
 * Packing a parcel of cylinders (carrier packing guidance): each cylinder in its own padded tube, the
 * tubes lying side by side in a grid, at least 2 in of cushioning on every side, and fragile goods
 * double-boxed: the tubes fill an inner box, and the inner box sits in an outer box with the cushioning
 * all round it. Units: inches and grams. Dimensional weight = outer box L × W × H (outside, in³) ÷ the
 * divisor in in³ per lb; billable weight = max(actual, dimensional), each rounded up to the whole gram.
 */

/** Sizes of a box or a load, largest first, so that "fits" is a comparison side by side. */
export type PackingExtent = [number, number, number]

const SLACK = 1e-9

function extentOf(lengthIn: number, widthIn: number, heightIn: number): PackingExtent {
  const sides = [lengthIn, widthIn, heightIn].sort((a, b) => b - a)
  return [sides[0] ?? 0, sides[1] ?? 0, sides[2] ?? 0]
}

function grow(extent: PackingExtent, byEachSideIn: number): PackingExtent {
  return [extent[0] + 2 * byEachSideIn, extent[1] + 2 * byEachSideIn, extent[2] + 2 * byEachSideIn]
}

/** Turned whichever way suits, does `load` go in `space`? (Sorted sides compared pairwise.) */
function fitsIn(load: PackingExtent, space: PackingExtent): boolean {
  return load[0] <= space[0] + SLACK && load[1] <= space[1] + SLACK && load[2] <= space[2] + SLACK
}

const volumeOf = (extent: PackingExtent) => extent[0] * extent[1] * extent[2]
const insideOf = (box: PackingBox) => extentOf(box.inside.lengthIn, box.inside.widthIn, box.inside.heightIn)
const outsideOf = (box: PackingBox) => grow(insideOf(box), box.wallIn)
type LengthPreferences = Pick<UnitPreferences, 'length' | 'locale'>

/** A box's or a content's sides with their unit: `12 × 8 × 6 in`, or `305 × 203 × 152 mm` in a millimetre shop. */
const describe = (extent: PackingExtent, lengths?: LengthPreferences) => lengths?.length === 'mm'
  ? `${extent.map(side => Math.round(inchesToMillimetres(side))).join(' × ')} mm`
  : `${extent.map(side => Math.round(side * 100) / 100).join(' × ')} in`

/**
 * A depth of cushioning in the shop's length unit with the other beside: `2 in (50 mm)` or `50 mm (2 in)`.
 * Millimetres go to the nearest 5, as carriers' metric packing guidance gives 2 in as 5 cm; inches to
 * the nearest eighth, as a packer measures foam.
 */
export function formatCushioning(inches: number, prefs: Pick<UnitPreferences, 'length' | 'locale'> = { length: 'in', locale: 'en-GB' }): string {
  const number = (value: number) => new Intl.NumberFormat(prefs.locale, { maximumFractionDigits: 3 }).format(value)
  const inch = `${number(Math.round(inches * 8) / 8)} in`
  const mm = `${number(Math.round(inchesToMillimetres(inches) / 5) * 5)} mm`
  return prefs.length === 'mm' ? `${mm} (${inch})` : `${inch} (${mm})`
}

export interface TubeGrid {
  across: number
  high: number
  endToEnd: number
  /** Space the tubes take, largest side first. */
  extentIn: PackingExtent
}

/** Every grid of parallel tubes that holds `count` of them without a wasted layer. */
function tubeGrids(count: number, tube: PackingTube): TubeGrid[] {
  const grids: TubeGrid[] = []
  for (let across = 1; across <= count; across++) {
    for (let high = 1; high <= across && across * high <= count * 2; high++) {
      const endToEnd = Math.ceil(count / (across * high))
      if ((endToEnd - 1) * across * high >= count) continue
      grids.push({
        across,
        high,
        endToEnd,
        extentIn: extentOf(across * tube.outsideDiameterIn, high * tube.outsideDiameterIn, endToEnd * tube.outsideLengthIn),
      })
    }
  }
  return grids
}

/** The smallest tube (by outside volume) that takes a standard blank. */
export function chooseTube(settings: EngineSettings = defaultEngineSettings): PackingTube | undefined {
  const tubeVolume = (tube: PackingTube) => tube.outsideDiameterIn ** 2 * tube.outsideLengthIn
  return settings.packing.tubes
    .filter(tube => tube.insideDiameterIn >= standardBlankDimensions.outsideDiameterIn && tube.insideLengthIn >= standardBlankDimensions.lengthIn)
    .sort((a, b) => tubeVolume(a) - tubeVolume(b))[0]
}

/** Parcels needed for `cylinders`, at most `packing.cylindersPerParcel` each. */
export function parcelsForCylinders(cylinders: number, settings: EngineSettings = defaultEngineSettings): number {
  if (!Number.isInteger(cylinders) || cylinders < 0) throw new RangeError(`expected a whole number of cylinders, got ${cylinders}`)
  return Math.ceil(cylinders / settings.packing.cylindersPerParcel)
}

export interface PackingRequest {
  cylinders: number
  /** Wax cylinders are fragile; false only for something that is not. */
  fragile?: boolean | undefined
  /** The outer box the packer wants to use (a box id of the settings); the smallest that fits when absent. */
  outerBoxId?: string | undefined
  /** The shop's length unit for the reasons nothing fits (inches when left out). */
  lengths?: LengthPreferences | undefined
}

export interface PackageChoice {
  ok: true
  cylinders: number
  tube: PackingTube
  grid: TubeGrid
  /** Absent when the parcel is single-boxed. */
  innerBox?: PackingBox
  outerBox: PackingBox
  /** Outer box outside, largest side first: what the carrier measures. */
  outsideIn: PackingExtent
  /** Smallest gap on any side between the contents and the outer box's walls. */
  cushioningIn: number
  actualWeightG: number
  dimensionalWeightG: number
  billableWeightG: number
}

export interface NoPackageFits {
  ok: false
  cylinders: number
  reason: string
}

/** Dimensional weight in grams of a box whose outside is `outsideIn`. */
export function dimensionalWeightG(outsideIn: PackingExtent, divisorIn3PerLb: number): number {
  return (volumeOf(outsideIn) / divisorIn3PerLb) * GRAMS_PER_POUND
}

/** The carrier bills the greater of the weight on the scale and the dimensional weight. */
export function billableWeightG(actualWeightG: number, dimensionalWeight: number): number {
  return Math.max(actualWeightG, dimensionalWeight)
}

const wholeGramsUp = (grams: number) => Math.ceil(grams - SLACK)

/**
 * The smallest outer box (by outside volume, then the smallest inner box) that takes `cylinders` tubes
 * with the cushioning all round; or why nothing does.
 */
export function choosePackage(request: PackingRequest, settings: EngineSettings = defaultEngineSettings): PackageChoice | NoPackageFits {
  const { cylinders, lengths } = request
  if (!Number.isInteger(cylinders) || cylinders < 1) throw new RangeError(`expected one or more whole cylinders, got ${cylinders}`)
  const packing = settings.packing
  // The schema already insists on 2 in; this keeps a hand-built settings object honest too.
  const cushionIn = Math.max(2, packing.cushioningIn)
  if (cylinders > packing.cylindersPerParcel) {
    return { ok: false, cylinders, reason: `${cylinders} cylinders are more than the ${packing.cylindersPerParcel} one parcel takes: split them into ${parcelsForCylinders(cylinders, settings)} parcels.` }
  }
  const tube = chooseTube(settings)
  if (!tube) {
    return { ok: false, cylinders, reason: `No tube in the settings takes a standard blank (${standardBlankDimensions.outsideDiameterIn} in across, ${standardBlankDimensions.lengthIn} in long).` }
  }
  const doubleBox = (request.fragile ?? true) && packing.doubleBoxFragile
  const boxes = [...packing.boxes].sort((a, b) => volumeOf(outsideOf(a)) - volumeOf(outsideOf(b)))
  const grids = tubeGrids(cylinders, tube)
  const wantedOuter = request.outerBoxId === undefined ? undefined : boxes.find(box => box.id === request.outerBoxId)
  if (request.outerBoxId !== undefined && !wantedOuter) {
    return { ok: false, cylinders, reason: `No box "${request.outerBoxId}" in the settings: choose one of ${boxes.map(box => box.id).join(', ')}.` }
  }
  const outerChoices = wantedOuter ? [wantedOuter] : boxes

  // What goes inside the outer box: the bare tube grid, or each inner box the grid fits.
  const contents: { grid: TubeGrid, innerBox?: PackingBox, contentIn: PackingExtent }[] = []
  for (const grid of grids) {
    if (!doubleBox) contents.push({ grid, contentIn: grid.extentIn })
    else {
      for (const innerBox of boxes) {
        if (fitsIn(grid.extentIn, insideOf(innerBox))) contents.push({ grid, innerBox, contentIn: outsideOf(innerBox) })
      }
    }
  }

  let best: { grid: TubeGrid, innerBox?: PackingBox, outerBox: PackingBox, contentIn: PackingExtent, rank: [number, number] } | undefined
  for (const content of contents) {
    const outerBox = outerChoices.find(box => box !== content.innerBox && fitsIn(grow(content.contentIn, cushionIn), insideOf(box)))
    if (!outerBox) continue
    const rank: [number, number] = [volumeOf(outsideOf(outerBox)), volumeOf(content.contentIn)]
    if (!best || rank[0] < best.rank[0] - SLACK || (rank[0] <= best.rank[0] + SLACK && rank[1] < best.rank[1] - SLACK)) {
      best = { ...content, outerBox, rank }
    }
  }

  if (!best) {
    const largest = boxes.at(-1)
    const largestText = largest ? `the largest box is ${describe(insideOf(largest), lengths)} inside` : 'there are no boxes'
    const smallestContent = contents.map(content => content.contentIn).sort((a, b) => volumeOf(a) - volumeOf(b))[0]
    if (wantedOuter) {
      const need = smallestContent ? `they need at least ${describe(grow(smallestContent, cushionIn), lengths)} inside` : 'no other box holds them as an inner box'
      return { ok: false, cylinders, reason: `Box ${wantedOuter.label} (${wantedOuter.id}, ${describe(insideOf(wantedOuter), lengths)} inside) does not take ${countOf(cylinders, 'tube')}${doubleBox ? ' double-boxed' : ''} with ${formatCushioning(cushionIn, lengths)} of cushioning on every side: ${need}.` }
    }
    if (!smallestContent) {
      return { ok: false, cylinders, reason: `No box fits: no box in the settings holds ${countOf(cylinders, 'tube')} as an inner box; ${largestText}.` }
    }
    return {
      ok: false,
      cylinders,
      reason: `No box fits: ${countOf(cylinders, 'tube')}${doubleBox ? ' double-boxed' : ''} with ${formatCushioning(cushionIn, lengths)} of cushioning on every side need at least ${describe(grow(smallestContent, cushionIn), lengths)} inside; ${largestText}.`,
    }
  }

  const { grid, innerBox, outerBox, contentIn } = best
  const outsideIn = outsideOf(outerBox)
  const space = insideOf(outerBox)
  const cushioningIn = Math.min(...space.map((side, axis) => (side - (contentIn[axis] ?? 0)) / 2))
  const actual = wholeGramsUp(
    cylinders * (packing.cylinderWeightG + tube.weightG) + (innerBox?.weightG ?? 0) + outerBox.weightG + packing.fillerWeightG,
  )
  const dimensional = wholeGramsUp(dimensionalWeightG(outsideIn, packing.dimensionalDivisorIn3PerLb))
  return {
    ok: true,
    cylinders,
    tube,
    grid,
    ...(innerBox ? { innerBox } : {}),
    outerBox,
    outsideIn,
    cushioningIn,
    actualWeightG: actual,
    dimensionalWeightG: dimensional,
    billableWeightG: billableWeightG(actual, dimensional),
  }
}
