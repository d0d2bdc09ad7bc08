import { and, asc, desc, inArray } from 'drizzle-orm'
import { orderEvents, orderItems, orders } from '../../db/schema'

/*
 * GET /api/dispatch/queue (shipper or maker): the orders to pack and those packed and waiting for the
 * carrier, oldest first, with where each goes, what is in it, and the packing the engine suggests
 * (tube, boxes, billable weight from the shop's figures). Nothing about payments: the shipper sees
 * what to pack and where, not what it cost.
 */
const QUEUE_LIMIT = 200

export default defineEventHandler(async (event) => {
  await requireRole(event, 'shipper', 'maker')
  const db = await useDB()
  const settings = await getSetting('engine', db)
  const rows = await db.select({ id: orders.id, number: orders.number, status: orders.status, shipTo: orders.shippingAddress, zone: orders.zone, updatedAt: orders.updatedAt })
    .from(orders).where(inArray(orders.status, ['ready_to_pack', 'packed'])).orderBy(asc(orders.updatedAt), asc(orders.id)).limit(QUEUE_LIMIT + 1)
  const shown = rows.slice(0, QUEUE_LIMIT)
  const ids = shown.map(row => row.id)
  const items = ids.length
    ? await db.select({ orderId: orderItems.orderId, title: orderItems.title, format: orderItems.format, quantity: orderItems.quantity }).from(orderItems).where(inArray(orderItems.orderId, ids)).orderBy(asc(orderItems.id))
    : []
  const events = ids.length
    ? await db.select({ orderId: orderEvents.orderId, toStatus: orderEvents.toStatus, at: orderEvents.at }).from(orderEvents)
        .where(and(inArray(orderEvents.orderId, ids), inArray(orderEvents.toStatus, ['ready_to_pack', 'packed']))).orderBy(desc(orderEvents.at))
    : []
  const zones = new Map(settings.prices.shippingZones.map(zone => [zone.id, zone.label]))

  const entries = shown.map((order) => {
    const contents = items.filter(item => item.orderId === order.id).map(({ title, format, quantity }) => ({ title, format, quantity }))
    const cylinders = contents.reduce((sum, item) => sum + item.quantity, 0)
    // Full parcels first, then the rest: the engine's smallest box for each.
    const perParcel = settings.packing.cylindersPerParcel
    const parcels = Array.from({ length: parcelsForCylinders(cylinders, settings) }, (_, index) => Math.min(perParcel, cylinders - index * perParcel))
      .map((count) => {
        const choice = choosePackage({ cylinders: count }, settings)
        return choice.ok
          ? { cylinders: count, ok: true as const, tube: choice.tube.label, innerBox: choice.innerBox?.label ?? null, outerBox: choice.outerBox.label, outsideIn: choice.outsideIn, actualWeightG: choice.actualWeightG, billableWeightG: choice.billableWeightG }
          : { cylinders: count, ok: false as const, reason: choice.reason }
      })
    const since = events.find(entry => entry.orderId === order.id && entry.toStatus === order.status)?.at ?? order.updatedAt
    return { number: order.number, status: order.status, since, shipTo: order.shipTo, zone: zones.get(order.zone) ?? order.zone, contents, cylinders, parcels }
  })
  return {
    readyToPack: entries.filter(entry => entry.status === 'ready_to_pack'),
    packed: entries.filter(entry => entry.status === 'packed'),
    more: rows.length > QUEUE_LIMIT,
  }
})
