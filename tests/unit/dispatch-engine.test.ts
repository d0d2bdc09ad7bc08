import { describe, expect, it } from 'vitest'
import { engineSettingsSchema } from '../../shared/utils/engineSettings'
import { addCalendarDays, heatRisk, nextEarlyWeekShippingDay, nextShippingDay, shippingWeekdays } from '../../shared/utils/heat'
import { choosePackage } from '../../shared/utils/packing'
import { GRAMS_PER_POUND } from '../../shared/utils/units'
import { dispatchShipSchema, normaliseTrackingNumber, packingChecklist, s10CheckDigit } from '../../shared/utils/dispatchSchemas'

const weekday = (isoDate: string) => new Date(`${isoDate}T00:00:00Z`).getUTCDay()

describe('nextShippingDay: the first day the shop ships on, early enough in the week to arrive by Friday (common shipping practice, no source)', () => {
  // 2025-07-03 is a Thursday (checked below), 2025-07-07 the Monday after.
  const monToWed = shippingWeekdays({ monday: true, tuesday: true, wednesday: true })

  it('reads the weekday record of the settings as day numbers', () => {
    expect(monToWed).toEqual([1, 2, 3])
    expect(shippingWeekdays(engineSettingsSchema.parse({}).dispatch.shipOn)).toEqual([1, 2, 3])
    expect(shippingWeekdays({ friday: true, sunday: true })).toEqual([0, 5])
  })

  it('skips the shop\'s no-ship weekdays: from a Thursday with Monday to Wednesday allowed it is the next Monday', () => {
    expect(weekday('2025-07-03')).toBe(4)
    expect(nextShippingDay('2025-07-03', monToWed)).toBe('2025-07-07')
    expect(nextShippingDay('2025-07-09', monToWed)).toBe('2025-07-09') // a Wednesday ships that day
  })

  it('a shop that ships only on Thursdays ships on the next Thursday when the parcel still arrives by Friday', () => {
    expect(nextShippingDay('2025-07-07', [4])).toBe('2025-07-10')
    expect(nextShippingDay('2025-07-07', [4], { daysInTransit: 1 })).toBe('2025-07-10')
    // Two days on the road from a Thursday reach Saturday; no Thursday does better, so the first one.
    expect(nextShippingDay('2025-07-07', [4], { daysInTransit: 2 })).toBe('2025-07-10')
  })

  it('with transit days a later day of the week is skipped for an earlier one', () => {
    // Wednesday + 3 days = Saturday: wait for Monday (+3 = Thursday).
    expect(nextShippingDay('2025-07-09', monToWed, { daysInTransit: 3 })).toBe('2025-07-14')
    expect(nextShippingDay('2025-07-09', monToWed, { daysInTransit: 2 })).toBe('2025-07-09')
  })

  it('keeps the old Monday-or-Tuesday answers', () => {
    expect(nextEarlyWeekShippingDay('2025-07-03')).toBe('2025-07-07')
    expect(nextEarlyWeekShippingDay('2025-07-08', { daysInTransit: 4 })).toBe('2025-07-14')
    expect(nextEarlyWeekShippingDay('2025-07-08', { daysInTransit: 7 })).toBe('2025-07-14')
  })

  it('refuses no weekdays at all, and counts calendar days across a month end', () => {
    expect(() => nextShippingDay('2025-07-03', [])).toThrow(/at least one weekday/)
    expect(addCalendarDays('2025-07-30', 3)).toBe('2025-08-02')
  })
})

describe('heat verdicts the dispatch check gives (default thresholds: caution 27 °C, hold 32 °C, 1 °C stricter per extra day)', () => {
  it('38 °C (100 °F) with 3 days in transit is a hold; 18 °C (64 °F) is ok', () => {
    expect(heatRisk({ forecastHigh: 38, unit: 'C', daysInTransit: 3 }).level).toBe('hold')
    expect(heatRisk({ forecastHigh: 100, unit: 'F', daysInTransit: 3 }).level).toBe('hold')
    expect(heatRisk({ forecastHigh: 18, unit: 'C', daysInTransit: 3 }).level).toBe('ok')
    expect(heatRisk({ forecastHigh: 64, unit: 'F', daysInTransit: 3 }).level).toBe('ok')
  })
})

/*
 * Box choice and billable weight by hand from the default settings: a padded tube 2.75 in across and
 * 4.875 in long outside (35 g), cylinders of 70 g, 150 g of filler, 2 in of cushioning on every side,
 * double-boxed, board walls 0.2 in (outside = inside + 0.4 in each way). Dimensional weight: outside
 * volume ÷ 139 in³/lb (carrier dimensional-weight practice, 139 in³/lb, common practice) × 453.59237 g/lb;
 * actual weight = tubes + cylinders + boxes + filler; billable = the larger, rounded up to the gram.
 */
describe('box choice and billable weight equal hand calculations (carrier dimensional-weight practice, 139 in³/lb)', () => {
  const dimensional = (l: number, w: number, h: number) => Math.ceil((l * w * h) / 139 * 453.59237)

  it('1 cylinder: inner 6 × 4 × 4, outer 12 × 10 × 10', () => {
    // One tube is 4.875 × 2.75 × 2.75 in: the 6 × 4 × 4 in box takes it; outside 6.4 × 4.4 × 4.4 in.
    // With 2 in all round it needs 10.4 × 8.4 × 8.4 in inside: 10 × 10 × 10 is short by 0.4 in, 12 × 10 × 10 takes it.
    const choice = choosePackage({ cylinders: 1 })
    expect(choice.ok).toBe(true)
    if (!choice.ok) return
    expect([choice.innerBox?.id, choice.outerBox.id]).toEqual(['box-4x4x6', 'box-12x10x10'])
    expect(choice.outsideIn).toEqual([12.4, 10.4, 10.4])
    expect(choice.actualWeightG).toBe(70 + 35 + 70 + 360 + 150) // 685 g
    expect(choice.dimensionalWeightG).toBe(dimensional(12.4, 10.4, 10.4)) // 1341.184 in³ → 4376.6 g → 4377 g
    expect(choice.dimensionalWeightG).toBe(4377)
    expect(choice.billableWeightG).toBe(4377)
    expect(GRAMS_PER_POUND).toBe(453.59237)
  })

  it('3 cylinders: a 2 × 2 grid in a 6 × 6 × 6 inner box, outer 12 × 12 × 12', () => {
    // Three tubes in a 2 × 2 grid take 5.5 × 5.5 × 4.875 in: the 6 × 6 × 6 box (outside 6.4 in a side).
    // Needs 10.4 in a side inside: 12 × 10 × 10 is short, 12 × 12 × 12 takes it. (A row of three, 8.25 in
    // long, needs the 10 × 8 × 6 inner box and then a 16 × 16 × 14 outer: larger.)
    const choice = choosePackage({ cylinders: 3 })
    if (!choice.ok) throw new Error(choice.reason)
    expect([choice.innerBox?.id, choice.outerBox.id]).toEqual(['box-6x6x6', 'box-12x12x12'])
    expect(choice.outsideIn).toEqual([12.4, 12.4, 12.4])
    expect(choice.actualWeightG).toBe(3 * (70 + 35) + 110 + 450 + 150) // 1025 g
    expect(choice.dimensionalWeightG).toBe(dimensional(12.4, 12.4, 12.4)) // 1906.624 in³ → 6221.7 g
    expect(choice.billableWeightG).toBe(6222)
  })

  it('6 cylinders: 2 × 2 × 2 in a 10 × 8 × 6 inner box, outer 16 × 16 × 14', () => {
    // Six tubes 2 across, 2 high, 2 end to end: 9.75 × 5.5 × 5.5 in, in the 10 × 8 × 6 box (outside
    // 10.4 × 8.4 × 6.4). Needs 14.4 × 12.4 × 10.4 in inside: 14 × 14 × 12 is 0.4 in short, 16 × 16 × 14 takes it.
    const choice = choosePackage({ cylinders: 6 })
    if (!choice.ok) throw new Error(choice.reason)
    expect([choice.innerBox?.id, choice.outerBox.id]).toEqual(['box-10x8x6', 'box-16x16x14'])
    expect(choice.outsideIn).toEqual([16.4, 16.4, 14.4])
    expect(choice.actualWeightG).toBe(6 * (70 + 35) + 190 + 720 + 150) // 1690 g
    expect(choice.dimensionalWeightG).toBe(dimensional(16.4, 16.4, 14.4)) // 3873.024 in³ → 12638.6 g
    expect(choice.billableWeightG).toBe(12639)
  })

  it('a chosen outer box: a larger one is used as asked; one too small says why; an unknown id says so', () => {
    const larger = choosePackage({ cylinders: 1, outerBoxId: 'box-14x14x12' })
    if (!larger.ok) throw new Error(larger.reason)
    expect(larger.outerBox.id).toBe('box-14x14x12')
    expect(larger.actualWeightG).toBe(70 + 35 + 70 + 560 + 150)
    expect(larger.dimensionalWeightG).toBe(dimensional(14.4, 14.4, 12.4))
    const small = choosePackage({ cylinders: 3, outerBoxId: 'box-8x8x8' })
    expect(small.ok).toBe(false)
    if (!small.ok) expect(small.reason).toMatch(/box-8x8x8.*does not take 3 tubes.*10\.4 × 10\.4 × 10\.4 in inside/)
    const unknown = choosePackage({ cylinders: 1, outerBoxId: 'crate' })
    expect(unknown.ok).toBe(false)
    if (!unknown.ok) expect(unknown.reason).toMatch(/No box "crate"/)
  })

  it('the checklist asks for the double box only when the parcel is double-boxed', () => {
    expect(packingChecklist({ cushioningIn: 2, doubleBox: true }).map(line => line.id)).toEqual(['tubes', 'cushioning', 'double_box', 'slip', 'marks'])
    expect(packingChecklist({ cushioningIn: 3, doubleBox: false }).map(line => line.id)).toEqual(['tubes', 'cushioning', 'slip', 'marks'])
    expect(packingChecklist({ cushioningIn: 3, doubleBox: false })[1]!.label).toMatch(/3 in/)
  })
})

describe('tracking numbers (UPU standard S10 check digit: weights 8 6 4 2 3 5 9 7, 11 − sum mod 11, 10 → 0, 11 → 5)', () => {
  it('the worked example RR 473 124 829 GB (from memory) has check digit 9, recomputed by hand', () => {
    // 4·8 + 7·6 + 3·4 + 1·2 + 2·3 + 4·5 + 8·9 + 2·7 = 32 + 42 + 12 + 2 + 6 + 20 + 72 + 14 = 200;
    // 200 mod 11 = 2; 11 − 2 = 9.
    expect(s10CheckDigit('47312482')).toBe(9)
    expect(normaliseTrackingNumber('post', 'rr 473 124 829 gb')).toEqual({ ok: true, value: 'RR473124829GB' })
  })

  it('the plain case and the two special ones (10 → 0, 11 → 5)', () => {
    // 00000001: 1·7 = 7, 7 mod 11 = 7 → 11 − 7 = 4. 00000011: 1·9 + 1·7 = 16, 16 mod 11 = 5 → 6.
    expect(s10CheckDigit('00000001')).toBe(4)
    expect(s10CheckDigit('00000011')).toBe(6)
    // 00000000: sum 0 → 11 − 0 = 11 → 5.
    expect(s10CheckDigit('00000000')).toBe(5)
    // 00001010: 1·3 + 1·9 = 12, 12 mod 11 = 1 → 11 − 1 = 10 → 0.
    expect(s10CheckDigit('00001010')).toBe(0)
  })

  it('for the postal carrier a wrong S10 check digit is refused; other carriers take any plain number', () => {
    const wrong = normaliseTrackingNumber('post', 'RR473124828GB')
    expect(wrong.ok).toBe(false)
    if (!wrong.ok) expect(wrong.reason).toMatch(/check digit should be 9/)
    expect(normaliseTrackingNumber('courier', 'RR473124828GB')).toEqual({ ok: true, value: 'RR473124828GB' })
    expect(normaliseTrackingNumber('post', '1Z 999-aa1 01')).toEqual({ ok: true, value: '1Z999-AA101' })
  })

  it('refuses what is not 6–40 letters, digits, spaces and hyphens, naming trackingNumber', () => {
    for (const bad of ['12345', 'x'.repeat(41), 'AB12<script>', 'AB 12/34']) expect(normaliseTrackingNumber('courier', bad).ok).toBe(false)
    const parsed = dispatchShipSchema.safeParse({ carrier: 'post', trackingNumber: 'RR473124828GB' })
    expect(parsed.success).toBe(false)
    expect(parsed.error?.issues[0]?.path).toEqual(['trackingNumber'])
    expect(dispatchShipSchema.parse({ carrier: ' Ferry Freight ', trackingNumber: ' ff-0012 345 ' })).toEqual({ carrier: 'Ferry Freight', trackingNumber: 'FF-0012345' })
  })
})
