import { desc, eq } from 'drizzle-orm'
import { heatChecks, orders, users } from '../../db/schema'
import type { EngineSettings } from '#shared/utils/engineSettings'
import type { UnitPreferences } from '#shared/utils/units'
import type { Database, Transaction } from '../platform/db'

/** Orders the shipper may open: those in dispatch or already gone. */
const dispatchStates = ['ready_to_pack', 'packed', 'shipped', 'delivered'] as const

/**
 * The engine's packing of the order's (first, fullest) parcel, in the outer box `boxId` when given,
 * with what the packer needs to check off. `{ ok: false, reason }` when nothing (or that box) fits.
 */
export function orderPacking(cylinders: number, settings: EngineSettings, boxId?: string, lengths?: Pick<UnitPreferences, 'length' | 'locale'>) {
  const perParcel = Math.min(cylinders, settings.packing.cylindersPerParcel)
  const choice = choosePackage({ cylinders: Math.max(1, perParcel), outerBoxId: boxId, lengths }, settings)
  if (!choice.ok) return { ok: false as const, reason: choice.reason }
  return {
    ok: true as const,
    boxId: choice.outerBox.id,
    cylinders: choice.cylinders,
    parcelCount: parcelsForCylinders(Math.max(1, cylinders), settings),
    tube: choice.tube.label,
    innerBox: choice.innerBox?.label ?? null,
    outerBox: choice.outerBox.label,
    outsideIn: choice.outsideIn,
    actualWeightG: choice.actualWeightG,
    dimensionalWeightG: choice.dimensionalWeightG,
    billableWeightG: choice.billableWeightG,
    cushioningIn: Math.round(choice.cushioningIn * 100) / 100,
  }
}

/** The checklist lines that apply to this packing, their depths in the shop's length unit (`prefs`). */
export function orderChecklist(packing: ReturnType<typeof orderPacking>, settings: EngineSettings, prefs?: Pick<UnitPreferences, 'length' | 'locale'>) {
  return packingChecklist({ cushioningIn: settings.packing.cushioningIn, doubleBox: packing.ok ? packing.innerBox !== null : settings.packing.doubleBoxFragile }, prefs)
}

/** One order as the packer sees it: the queue entry, the boxes, the packing for the chosen box, the checklist and every heat check. */
export async function dispatchDetail(db: Database | Transaction, number: string, boxId?: string) {
  const settings = await getSetting('engine', db)
  const units = await getSetting('units', db)
  const [order] = await db.select(dispatchOrderColumns).from(orders).where(eq(orders.number, number.toUpperCase()))
  if (!order || !(dispatchStates as readonly string[]).includes(order.status)) throw notFoundError('No such order in dispatch.')
  const [entry] = await dispatchEntries(db, [order], settings)
  const packing = orderPacking(entry!.cylinders, settings, boxId, units)
  if (boxId !== undefined && !packing.ok) throw fieldError('boxId', packing.reason)
  const checks = await db.select({
    verdict: heatChecks.verdict, reasons: heatChecks.reasons, nextShipDate: heatChecks.nextShipDate, forecastHigh: heatChecks.forecastHigh, unit: heatChecks.unit,
    forecastHighC: heatChecks.forecastHighC, transitDays: heatChecks.transitDays, checkedAt: heatChecks.checkedAt, checkedBy: users.name,
  }).from(heatChecks).leftJoin(users, eq(users.id, heatChecks.checkedBy)).where(eq(heatChecks.orderId, order.id)).orderBy(desc(heatChecks.checkedAt), desc(heatChecks.id)).limit(50)
  return {
    ...entry!,
    boxes: settings.packing.boxes.map(box => ({ id: box.id, label: box.label })),
    packing,
    checklist: orderChecklist(packing, settings, units),
    heatChecks: checks,
    carriers: settings.dispatch.carriers.map(carrier => ({ id: carrier.id, label: carrier.label })),
    shipOn: Object.entries(settings.dispatch.shipOn).filter(([, ships]) => ships).map(([name]) => name),
    temperatureUnit: units.temperature,
  }
}
