import { and, asc, desc, eq, gte, ilike, inArray, or, sql } from 'drizzle-orm'
import { orders, shipments } from '../../db/schema'
import type { Database } from '../platform/db'

/** Most orders in each list of the queue; `more` says when one was cut short. */
export const DISPATCH_LIST_LIMIT = 200
/** Shipped and delivered orders stay in the queue this many days after they left. */
export const DISPATCH_SHIPPED_DAYS = 30

const byPromiseThenAge = (a: DispatchEntry, b: DispatchEntry) => {
  if (a.promisedDate !== b.promisedDate) {
    if (a.promisedDate === null) return 1
    if (b.promisedDate === null) return -1
    return a.promisedDate < b.promisedDate ? -1 : 1
  }
  return new Date(a.since).getTime() - new Date(b.since).getTime()
}

/**
 * The shipper's queue: orders ready to pack (most urgent first: the promised date, then the oldest),
 * those held back by a heat check until a cooler day, those packed, and those shipped or delivered in
 * the last 30 days. `q` finds packed and shipped orders by order or tracking number.
 */
export async function dispatchQueue(db: Database, q?: string) {
  const settings = await getSetting('engine', db)
  const today = dispatchToday()
  const search = q ? containsPattern(q) : undefined
  const matches = search ? or(ilike(orders.number, search), ilike(shipments.trackingNumber, search)) : undefined

  const ready = await db.select(dispatchOrderColumns).from(orders).where(eq(orders.status, 'ready_to_pack'))
    .orderBy(asc(orders.updatedAt), asc(orders.id)).limit(DISPATCH_LIST_LIMIT + 1)
  const packed = await db.select(dispatchOrderColumns).from(orders).leftJoin(shipments, eq(shipments.orderId, orders.id))
    .where(and(eq(orders.status, 'packed'), matches)).orderBy(asc(orders.updatedAt), asc(orders.id)).limit(DISPATCH_LIST_LIMIT + 1)
  const leftAt = sql`coalesce(${shipments.shippedAt}, ${orders.updatedAt})`
  const shipped = await db.select(dispatchOrderColumns).from(orders).leftJoin(shipments, eq(shipments.orderId, orders.id))
    .where(and(inArray(orders.status, ['shipped', 'delivered']), gte(leftAt, new Date(Date.now() - DISPATCH_SHIPPED_DAYS * 86_400_000)), matches))
    .orderBy(desc(leftAt), desc(orders.id)).limit(DISPATCH_LIST_LIMIT + 1)

  const readyEntries = await dispatchEntries(db, ready.slice(0, DISPATCH_LIST_LIMIT), settings)
  const held = readyEntries.filter(entry => entry.heat?.verdict === 'hold' && entry.heat.nextShipDate > today)
  return {
    readyToPack: readyEntries.filter(entry => !held.includes(entry)).sort(byPromiseThenAge),
    held: held.sort((a, b) => a.heat!.nextShipDate.localeCompare(b.heat!.nextShipDate) || byPromiseThenAge(a, b)),
    packed: await dispatchEntries(db, packed.slice(0, DISPATCH_LIST_LIMIT), settings),
    shipped: await dispatchEntries(db, shipped.slice(0, DISPATCH_LIST_LIMIT), settings),
    more: [ready, packed, shipped].some(rows => rows.length > DISPATCH_LIST_LIMIT),
    temperatureUnit: (await getSetting('units', db)).temperature,
  }
}
