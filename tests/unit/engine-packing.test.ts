import { describe, expect, it } from 'vitest'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'
import type { PackingBox } from '../../shared/utils/engineSettings'
import { billableWeightG, choosePackage, dimensionalWeightG, parcelsForCylinders } from '../../shared/utils/packing'

const sorted = (sides: number[]) => [...sides].sort((a, b) => b - a)
const insideSides = (box: PackingBox) => sorted([box.inside.lengthIn, box.inside.widthIn, box.inside.heightIn])
const outsideSides = (box: PackingBox) => insideSides(box).map(side => side + 2 * box.wallIn)
const volume = (sides: number[]) => sides.reduce((product, side) => product * side, 1)
const box = (id: string, l: number, w: number, h: number): PackingBox => ({ id, label: id, inside: { lengthIn: l, widthIn: w, heightIn: h }, wallIn: 0.2, weightG: 100 })

describe('choosePackage (carrier packing guidance: ≥ 2 in cushioning on every side, double-box fragile items)', () => {
  it('double-boxes one cylinder in the smallest outer box that leaves 2 in all round the inner box', () => {
    const settings = engineSettingsSchema.parse({
      packing: { boxes: [box('huge', 14, 14, 14), box('snug-outer-too-small', 8, 8, 8), box('outer', 10, 8, 8), box('inner', 5, 3, 3)] },
    })
    const choice = choosePackage({ cylinders: 1 }, settings)
    if (!choice.ok) throw new Error(choice.reason)
    expect(choice.innerBox?.id).toBe('inner')
    expect(choice.outerBox.id).toBe('outer')
  })

  it('no box of smaller volume than the chosen one could have held the load (default boxes, brute force)', () => {
    const { boxes, cylindersPerParcel } = defaultEngineSettings.packing
    const fits = (load: number[], space: number[]) => load.every((side, axis) => side <= (space[axis] ?? 0) + 1e-9)
    for (let cylinders = 1; cylinders <= cylindersPerParcel; cylinders++) {
      const choice = choosePackage({ cylinders })
      if (!choice.ok || !choice.innerBox) throw new Error('expected a double-boxed parcel')
      const { outsideDiameterIn: d, outsideLengthIn: length } = choice.tube
      // every block of parallel tubes a × b × c that holds the cylinders
      const loads: number[][] = []
      for (let a = 1; a <= cylinders; a++) {
        for (let b = 1; b <= cylinders; b++) {
          for (let c = 1; c <= cylinders; c++) if (a * b * c >= cylinders) loads.push(sorted([a * d, b * d, c * length]))
        }
      }
      const innerOptions = boxes.filter(inner => loads.some(load => fits(load, insideSides(inner))))
      expect(innerOptions).toContain(choice.innerBox)
      const couldHold = (outer: PackingBox) => innerOptions.some(inner => inner !== outer && fits(outsideSides(inner).map(side => side + 4), insideSides(outer)))
      expect(couldHold(choice.outerBox)).toBe(true)
      for (const smaller of boxes.filter(candidate => volume(outsideSides(candidate)) < volume(outsideSides(choice.outerBox)))) {
        expect(couldHold(smaller)).toBe(false)
      }
    }
  })

  it('keeps at least 2 in of cushioning on every side (carrier packing guidance)', () => {
    for (let cylinders = 1; cylinders <= defaultEngineSettings.packing.cylindersPerParcel; cylinders++) {
      const choice = choosePackage({ cylinders })
      if (!choice.ok || !choice.innerBox) throw new Error('expected a double-boxed parcel')
      const inner = outsideSides(choice.innerBox)
      insideSides(choice.outerBox).forEach((side, axis) => expect(side - (inner[axis] ?? Infinity)).toBeGreaterThanOrEqual(4))
      expect(choice.cushioningIn).toBeGreaterThanOrEqual(2)
    }
  })

  it('will not store less than 2 in of cushioning, and a larger cushion needs a larger box', () => {
    expect(engineSettingsSchema.safeParse({ packing: { cushioningIn: 1.5 } }).error?.issues[0]?.message).toMatch(/at least 2 in/)
    const usual = choosePackage({ cylinders: 1 })
    const thicker = choosePackage({ cylinders: 1 }, engineSettingsSchema.parse({ packing: { cushioningIn: 3 } }))
    if (!usual.ok || !thicker.ok) throw new Error('expected both to fit')
    expect(volume(thicker.outsideIn)).toBeGreaterThan(volume(usual.outsideIn))
    expect(thicker.cushioningIn).toBeGreaterThanOrEqual(3)
  })

  it('single-boxes something not fragile with the cushioning round the tubes', () => {
    const choice = choosePackage({ cylinders: 1, fragile: false })
    if (!choice.ok) throw new Error(choice.reason)
    expect(choice.innerBox).toBeUndefined()
    const tube = choice.tube
    const load = sorted([tube.outsideLengthIn, tube.outsideDiameterIn, tube.outsideDiameterIn])
    insideSides(choice.outerBox).forEach((side, axis) => expect(side - (load[axis] ?? Infinity)).toBeGreaterThanOrEqual(4))
  })

  it('says why when no box fits', () => {
    const settings = engineSettingsSchema.parse({ packing: { boxes: [box('small', 6, 4, 4), box('medium', 8, 8, 8)] } })
    const choice = choosePackage({ cylinders: 1 }, settings)
    expect(choice.ok).toBe(false)
    if (choice.ok) return
    expect(choice.reason).toMatch(/^No box fits: 1 tube double-boxed with 2 in \(50 mm\) of cushioning on every side need at least .* in inside; the largest box is 8 × 8 × 8 in inside\.$/)
  })

  it('says it in millimetres in a millimetre shop (1 in = 25.4 mm exactly, NIST SP 811 B.8)', () => {
    const settings = engineSettingsSchema.parse({ packing: { boxes: [box('small', 6, 4, 4), box('medium', 8, 8, 8)] } })
    const choice = choosePackage({ cylinders: 1, lengths: { length: 'mm', locale: 'en-GB' } }, settings)
    expect(choice.ok).toBe(false)
    if (choice.ok) return
    // 8 in = 203.2 mm, shown to the whole millimetre; the cushioning to the nearest 5 mm as carriers' metric guidance gives it.
    expect(choice.reason).toMatch(/^No box fits: 1 tube double-boxed with 50 mm \(2 in\) of cushioning on every side need at least \d+ × \d+ × \d+ mm inside; the largest box is 203 × 203 × 203 mm inside\.$/)
  })

  it('sends more cylinders than one parcel takes back to be split', () => {
    const over = defaultEngineSettings.packing.cylindersPerParcel + 1
    const choice = choosePackage({ cylinders: over })
    expect(choice.ok).toBe(false)
    if (!choice.ok) expect(choice.reason).toMatch(/split them into 2 parcels/)
    expect(parcelsForCylinders(over)).toBe(2)
  })
})

describe('billable weight = max(actual, dimensional) (carrier packing guidance)', () => {
  it('is the dimensional weight for a light, bulky parcel', () => {
    const choice = choosePackage({ cylinders: 1 })
    if (!choice.ok) throw new Error(choice.reason)
    const expectedDimensional = Math.ceil((volume(choice.outsideIn) / defaultEngineSettings.packing.dimensionalDivisorIn3PerLb) * 453.59237)
    expect(choice.dimensionalWeightG).toBe(expectedDimensional)
    expect(choice.dimensionalWeightG).toBeGreaterThan(choice.actualWeightG)
    expect(choice.billableWeightG).toBe(choice.dimensionalWeightG)
  })

  it('is the actual weight for a heavy, compact parcel', () => {
    const settings = engineSettingsSchema.parse({ packing: { cylinderWeightG: 4000 } })
    const choice = choosePackage({ cylinders: 2 }, settings)
    if (!choice.ok) throw new Error(choice.reason)
    const packing = settings.packing
    const expectedActual = 2 * (4000 + choice.tube.weightG) + (choice.innerBox?.weightG ?? 0) + choice.outerBox.weightG + packing.fillerWeightG
    expect(choice.actualWeightG).toBe(expectedActual)
    expect(choice.actualWeightG).toBeGreaterThan(choice.dimensionalWeightG)
    expect(choice.billableWeightG).toBe(choice.actualWeightG)
  })

  it('works out dimensional weight as L × W × H ÷ divisor', () => {
    // 12 × 12 × 12 in at 139 in³/lb = 12.43 lb
    expect(dimensionalWeightG([12, 12, 12], 139)).toBeCloseTo((1728 / 139) * 453.59237, 9)
    expect(billableWeightG(500, 800)).toBe(800)
    expect(billableWeightG(900, 800)).toBe(900)
  })
})
