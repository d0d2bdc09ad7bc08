import { asc, desc, eq, inArray } from 'drizzle-orm'
import { blanks, customMessages, heatChecks, orderEvents, orderItems, orders, shipments, tickets } from '../../db/schema'
import type { EngineSettings } from '#shared/utils/engineSettings'
import type { UnitPreferences } from '#shared/utils/units'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction
type DispatchOrderRow = Pick<OrderRow, 'id' | 'number' | 'status' | 'shippingAddress' | 'zone' | 'updatedAt'>

/** The order columns a dispatch entry is built from: never a price or a payment. */
export const dispatchOrderColumns = {
  id: orders.id, number: orders.number, status: orders.status, shippingAddress: orders.shippingAddress, zone: orders.zone, updatedAt: orders.updatedAt,
}

/** Today's calendar date (UTC) as `YYYY-MM-DD`: the day heat holds and claim windows are counted in. */
export function dispatchToday(now = new Date()): string {
  return now.toISOString().slice(0, 10)
}

/** The engine's packing for one parcel of `count` cylinders, as the queue shows it. */
export function parcelPacking(count: number, settings: EngineSettings, lengths?: Pick<UnitPreferences, 'length' | 'locale'>) {
  const choice = choosePackage({ cylinders: count, lengths }, settings)
  return choice.ok
    ? { cylinders: count, ok: true as const, tube: choice.tube.label, innerBox: choice.innerBox?.label ?? null, outerBox: choice.outerBox.label, outsideIn: choice.outsideIn, actualWeightG: choice.actualWeightG, billableWeightG: choice.billableWeightG }
    : { cylinders: count, ok: false as const, reason: choice.reason }
}

/** Full parcels first, then the rest: the engine's smallest box for each. */
export function orderParcels(cylinders: number, settings: EngineSettings, lengths?: Pick<UnitPreferences, 'length' | 'locale'>) {
  const perParcel = settings.packing.cylindersPerParcel
  return Array.from({ length: parcelsForCylinders(cylinders, settings) }, (_, index) => Math.min(perParcel, cylinders - index * perParcel))
    .map(count => parcelPacking(count, settings, lengths))
}

/** The newest heat check of each order, by order id. */
export async function newestHeatChecks(db: Db, orderIds: number[]): Promise<Map<number, HeatCheckRow>> {
  const rows = orderIds.length
    ? await db.select().from(heatChecks).where(inArray(heatChecks.orderId, orderIds)).orderBy(desc(heatChecks.checkedAt), desc(heatChecks.id))
    : []
  const newest = new Map<number, HeatCheckRow>()
  for (const row of rows) if (!newest.has(row.orderId)) newest.set(row.orderId, row)
  return newest
}

/** Whether a heat check holds the order back today: a hold whose next shipping date is still to come. */
export function heatHoldsOrder(check: Pick<HeatCheckRow, 'verdict' | 'nextShipDate'> | undefined | null, today = dispatchToday()): boolean {
  return check?.verdict === 'hold' && check.nextShipDate > today
}

export function heatSummary(check: HeatCheckRow | undefined) {
  return check
    ? { verdict: check.verdict, reasons: check.reasons, nextShipDate: check.nextShipDate, forecastHighC: Math.round(check.forecastHighC * 10) / 10, checkedAt: check.checkedAt }
    : null
}

/**
 * Dispatch entries for these orders: where each goes, what is in it (with the blanks its cylinders were
 * cut on), the promised date, the engine's packing per parcel, the newest heat check and the shipment.
 * The promised date is the earliest date a personal message is wished for, else the latest due date of
 * the order's tickets, else none.
 */
export async function dispatchEntries(db: Db, rows: DispatchOrderRow[], settings: EngineSettings) {
  const ids = rows.map(row => row.id)
  if (ids.length === 0) return []
  // Reasons a parcel has no box speak the shop's length unit.
  const units = await getSetting('units', db)
  const items = await db.select({ id: orderItems.id, orderId: orderItems.orderId, title: orderItems.title, format: orderItems.format, quantity: orderItems.quantity })
    .from(orderItems).where(inArray(orderItems.orderId, ids)).orderBy(asc(orderItems.id))
  const ticketRows = await db.select({ orderId: tickets.orderId, orderItemId: tickets.orderItemId, unit: tickets.unit, dueDate: tickets.dueDate, blankCode: blanks.code })
    .from(tickets).leftJoin(blanks, eq(blanks.id, tickets.blankId)).where(inArray(tickets.orderId, ids)).orderBy(asc(tickets.unit))
  const wishes = await db.select({ orderId: orderItems.orderId, wishedDate: customMessages.wishedDate })
    .from(customMessages).innerJoin(orderItems, eq(orderItems.id, customMessages.orderItemId)).where(inArray(orderItems.orderId, ids))
  const events = await db.select({ orderId: orderEvents.orderId, toStatus: orderEvents.toStatus, at: orderEvents.at }).from(orderEvents)
    .where(inArray(orderEvents.orderId, ids)).orderBy(desc(orderEvents.at), desc(orderEvents.id))
  const shipmentRows = await db.select().from(shipments).where(inArray(shipments.orderId, ids))
  const heat = await newestHeatChecks(db, ids)
  const zones = new Map(settings.prices.shippingZones.map(zone => [zone.id, zone.label]))

  return rows.map((order) => {
    const contents = items.filter(item => item.orderId === order.id).map(item => ({
      title: item.title,
      format: item.format,
      quantity: item.quantity,
      blankCodes: ticketRows.filter(ticket => ticket.orderItemId === item.id && ticket.blankCode).map(ticket => ticket.blankCode!),
    }))
    const cylinders = contents.reduce((sum, item) => sum + item.quantity, 0)
    const wished = wishes.filter(wish => wish.orderId === order.id).map(wish => wish.wishedDate).sort()
    const due = ticketRows.filter(ticket => ticket.orderId === order.id && ticket.dueDate).map(ticket => ticket.dueDate!).sort()
    const shipment = shipmentRows.find(row => row.orderId === order.id)
    return {
      number: order.number,
      status: order.status,
      since: events.find(entry => entry.orderId === order.id && entry.toStatus === order.status)?.at ?? order.updatedAt,
      promisedDate: wished[0] ?? due.at(-1) ?? null,
      shipTo: order.shippingAddress,
      zone: zones.get(order.zone) ?? order.zone,
      contents,
      cylinders,
      parcels: cylinders > 0 ? orderParcels(cylinders, settings, units) : [],
      heat: heatSummary(heat.get(order.id)),
      shipment: shipment
        ? { carrier: shipment.carrier, carrierLabel: shipment.carrier ? carrierLabel(settings, shipment.carrier) : null, trackingNumber: shipment.trackingNumber, packedAt: shipment.packedAt, shippedAt: shipment.shippedAt, deliveredAt: shipment.deliveredAt }
        : null,
    }
  })
}
export type DispatchEntry = Awaited<ReturnType<typeof dispatchEntries>>[number]

/** The order with this number, locked for a dispatch change; 404 when there is none. */
export async function lockDispatchOrder(tx: Transaction, number: string) {
  const [order] = await tx.select().from(orders).where(eq(orders.number, number.toUpperCase())).for('update')
  if (!order) throw notFoundError('No such order.')
  return order
}

const statusWords = (status: string) => status.replace(/_/g, ' ')

/** A 409 saying what state the order is in and what the action needs. */
export function dispatchStateError(number: string, status: string, needed: string) {
  return conflictError(`Order ${number} is ${statusWords(status)}; ${needed}.`, { status })
}
