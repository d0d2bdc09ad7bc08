import { and, count, eq } from 'drizzle-orm'
import { orderEvents, orderItems, shipments } from '../../db/schema'
import type { EngineSettings } from '#shared/utils/engineSettings'
import type { Database, Transaction } from '../platform/db'

type OrderRow = Awaited<ReturnType<typeof lockDispatchOrder>>

async function refuseWhileHeld(tx: Transaction, order: OrderRow, action: string) {
  const check = (await newestHeatChecks(tx, [order.id])).get(order.id)
  if (heatHoldsOrder(check)) {
    // The days in the shop's locale (Shop settings); the ISO day stays in the data for a program.
    const { locale } = await getSetting('units', tx)
    throw conflictError(`Order ${order.number} is held back by the heat check of ${formatDay(check!.checkedAt, locale)}: ${action} on or after ${formatShippingDay(check!.nextShipDate, locale)}, or check the heat again.`, { status: order.status, nextShipDate: check!.nextShipDate })
  }
}

async function cylinderCount(tx: Transaction, orderId: number): Promise<number> {
  const rows = await tx.select({ quantity: orderItems.quantity }).from(orderItems).where(eq(orderItems.orderId, orderId))
  return rows.reduce((sum, row) => sum + row.quantity, 0)
}

/**
 * Packs an order that is ready to pack: every checklist line that applies ticked, the engine's packing
 * for the chosen outer box, the weight on the scale, and a register blank tied to each blank sold. The order row is locked and the move conditional,
 * so two presses pack once (the second is a 409 saying it is packed).
 */
export async function packOrder(db: Database, number: string, input: DispatchPackInput, userId: number) {
  const settings = await getSetting('engine', db)
  const units = await getSetting('units', db)
  return await db.transaction(async (tx) => {
    const order = await lockDispatchOrder(tx, number)
    if (order.status !== 'ready_to_pack') throw dispatchStateError(order.number, order.status, 'only an order ready to pack can be packed')
    await refuseWhileHeld(tx, order, 'pack it')
    const packing = orderPacking(await cylinderCount(tx, order.id), settings, input.boxId, units)
    if (!packing.ok) throw fieldError(input.boxId === undefined ? 'checklist' : 'boxId', packing.reason)
    const missing = orderChecklist(packing, settings).filter(line => !input.checklist.includes(line.id))
    if (missing.length) throw fieldError('checklist', `tick every line before packing; missing: ${missing.map(line => line.id).join(', ')}`)
    // Each unit of a blank product goes out as one specific register blank (409 when the register has none).
    const blankCodes = await tieOrderBlanks(tx, order, userId)
    const packedAt = new Date()
    const moved = await moveOrder(tx, order.id, ['ready_to_pack'], 'packed', {}, `Packed in ${packing.outerBox}${input.weighedG ? `, ${input.weighedG} g on the scale` : ''}.`, userId)
    if (!moved) throw dispatchStateError(order.number, order.status, 'it changed meanwhile')
    const checklist = [...new Set(input.checklist)]
    const row = { packing: packing as Record<string, unknown>, weighedG: input.weighedG ?? null, checklist, packedBy: userId, packedAt }
    await tx.insert(shipments).values({ orderId: order.id, ...row }).onConflictDoUpdate({ target: shipments.orderId, set: row })
    return { number: order.number, status: moved.status, packing, weighedG: row.weighedG, checklist, packedAt, blanks: [...blankCodes.values()].flat() }
  })
}

/** A carrier's name from the shop's list (the id kept on the shipment), or the free text the shipper typed. */
export const carrierLabel = (settings: EngineSettings, carrier: string) => settings.dispatch.carriers.find(entry => entry.id === carrier)?.label ?? carrier

/** Heat advice for the season the parcel travels in: the order's heat check when there is one, else the month. */
function seasonHeatAdvice(verdict: string | undefined, now = new Date()): string {
  if (verdict === 'caution' || verdict === 'hold') return 'It is warm where the parcel is going: please bring it indoors as soon as it arrives, and ask a neighbour to take it in if you are out. A parcel left in the sun or in a van can soften the wax.'
  const month = now.getUTCMonth() + 1
  return month >= 5 && month <= 9
    ? 'It is the warm season: please bring the parcel indoors as soon as it arrives, out of the sun; wax softens in a hot van or on a sunny doorstep.'
    : 'Even in cool weather a parcel should not wait in the sun or beside a heater: bring it indoors when it arrives.'
}

async function queueShippedMail(tx: Transaction, order: OrderRow, shipped: { carrier: string, trackingNumber: string, round: number }, settings: EngineSettings) {
  const site = String(useRuntimeConfig().siteUrl)
  const heat = (await newestHeatChecks(tx, [order.id])).get(order.id)
  await queueMail(tx, {
    to: order.email,
    subject: `Order ${order.number} is on its way`,
    // One mail per time the order leaves (a replacement ships the same order again).
    dedupeKey: `order-shipped:${order.number}:${shipped.round}`,
    content: {
      heading: `Order ${order.number} has left the workshop`,
      paragraphs: [
        `Your parcel is with ${carrierLabel(settings, shipped.carrier)}. Tracking number: ${shipped.trackingNumber}.`,
        'When it arrives: keep the parcel cool and stand it upright on its end; let it come to room temperature for a few hours before you open it, so the wax does not crack from the change; then lift each cylinder by its ends, never by the grooved surface.',
        seasonHeatAdvice(heat?.verdict),
        `Care and playback: ${site}/guides/care — shipping in hot weather: ${site}/guides/shipping-and-heat.`,
        'If anything arrived broken, report it from your order page with a photo or two, within the time shown there.',
      ],
      action: { label: 'Follow your order', url: orderLink(order.number, order.userId !== null) },
    },
  })
}

/**
 * Ships a packed order: carrier and tracking number kept, the order shipped, its tickets done and their
 * blanks shipped (and the blanks packed for it), and one "on its way" mail with care and heat advice. Locked and conditional, so two
 * presses ship once and mail once; the second is a 409 saying it has shipped.
 */
export async function shipOrder(db: Database, number: string, input: DispatchShipInput, userId: number) {
  const settings = await getSetting('engine', db)
  return await db.transaction(async (tx) => {
    const order = await lockDispatchOrder(tx, number)
    if (order.status !== 'packed') throw dispatchStateError(order.number, order.status, 'only a packed order can be shipped')
    await refuseWhileHeld(tx, order, 'ship it')
    const moved = await moveOrder(tx, order.id, ['packed'], 'shipped', {}, `Shipped with ${carrierLabel(settings, input.carrier)}, tracking ${input.trackingNumber}.`, userId)
    if (!moved) throw dispatchStateError(order.number, order.status, 'it changed meanwhile')
    const ticketsDone = await closeTicketsOfShippedOrder(tx, order.id, userId)
    await shipOrderBlanks(tx, order.id, order.number, userId)
    const shippedAt = new Date()
    const row = { carrier: input.carrier, trackingNumber: input.trackingNumber, shippedBy: userId, shippedAt, deliveredAt: null, deliveredVia: null }
    await tx.insert(shipments).values({ orderId: order.id, ...row }).onConflictDoUpdate({ target: shipments.orderId, set: row })
    const [rounds] = await tx.select({ n: count() }).from(orderEvents).where(and(eq(orderEvents.orderId, order.id), eq(orderEvents.toStatus, 'shipped')))
    await queueShippedMail(tx, order, { ...input, round: Number(rounds?.n ?? 1) }, settings)
    return { number: order.number, status: moved.status, carrier: input.carrier, trackingNumber: input.trackingNumber, shippedAt, ticketsDone }
  })
}

/**
 * A shipped order has arrived, said by the shipper or by the customer. Only from shipped: a second press
 * is a 409 saying it is already delivered.
 */
export async function markDelivered(db: Database, number: string, via: 'shipper' | 'customer', userId: number | null) {
  return await db.transaction(async (tx) => {
    const order = await lockDispatchOrder(tx, number)
    if (order.status === 'delivered') throw conflictError(`Order ${order.number} is already delivered.`, { status: order.status })
    if (order.status !== 'shipped') throw dispatchStateError(order.number, order.status, 'only a shipped order can be marked delivered')
    const moved = await moveOrder(tx, order.id, ['shipped'], 'delivered', {}, via === 'customer' ? 'The customer says the parcel has arrived.' : 'Delivered, says dispatch.', userId ?? undefined)
    if (!moved) throw dispatchStateError(order.number, order.status, 'it changed meanwhile')
    const deliveredAt = new Date()
    const row = { deliveredAt, deliveredVia: via }
    await tx.insert(shipments).values({ orderId: order.id, ...row }).onConflictDoUpdate({ target: shipments.orderId, set: row })
    return { number: order.number, status: moved.status, deliveredAt, deliveredVia: via }
  })
}
