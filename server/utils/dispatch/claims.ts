import { and, desc, eq, inArray } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { claims, files, orderEvents, orderItems, orders, shipments, users } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction

/** Who may see an order's claims as its customer: the owner, or a guest holding the signed link. */
export function isOrderCustomer(user: { id: number } | null, order: Pick<OrderRow, 'number' | 'userId'>, token: string | undefined): boolean {
  return (user !== null && order.userId === user.id) || (token !== undefined && orderAccessTokenValid(order.number, token))
}

/** The order with this number when the caller is its customer (or, with `maker`, the maker); else a 404. */
export async function orderForCustomer(db: Db, event: H3Event, number: string, token: string | undefined, options: { maker?: boolean } = {}) {
  const user = await currentUser(event)
  const [order] = await db.select().from(orders).where(eq(orders.number, number.toUpperCase()))
  if (!order || !(isOrderCustomer(user, order, token) || (options.maker && user?.role === 'maker'))) throw notFoundError('No such order.')
  return { order, user }
}

/** When the parcel arrived: the shipment's date, else the order's move to delivered. */
async function deliveredAt(db: Db, order: OrderRow): Promise<Date | null> {
  if (order.status !== 'delivered') return null
  const [shipment] = await db.select({ at: shipments.deliveredAt }).from(shipments).where(eq(shipments.orderId, order.id))
  if (shipment?.at) return shipment.at
  const [event] = await db.select({ at: orderEvents.at }).from(orderEvents).where(and(eq(orderEvents.orderId, order.id), eq(orderEvents.toStatus, 'delivered'))).orderBy(desc(orderEvents.at)).limit(1)
  return event?.at ?? order.updatedAt
}

/** The last day a breakage may be reported (delivery day + the shop's claim window), or null before delivery. */
export async function claimLastDate(db: Db, order: OrderRow, windowDays: number): Promise<string | null> {
  const at = await deliveredAt(db, order)
  return at ? addCalendarDays(at, windowDays) : null
}

export function claimPhotoUrl(order: Pick<OrderRow, 'number' | 'userId'>, claimId: number, index: number): string {
  // A guest's order is read with its signed link; the photo addresses carry it so the page can show them.
  const token = order.userId === null ? `?t=${orderAccessToken(order.number)}` : ''
  return `/api/orders/${order.number}/claims/${claimId}/photos/${index}${token}`
}

/** What the customer's order page shows of dispatch: the shipment, the claims, and what may be done now. */
export async function orderDispatchView(db: Db, order: OrderRow) {
  const settings = await getSetting('engine', db)
  const [shipment] = await db.select().from(shipments).where(eq(shipments.orderId, order.id))
  const rows = await db.select().from(claims).where(eq(claims.orderId, order.id)).orderBy(claims.createdAt, claims.id)
  const claimUntil = await claimLastDate(db, order, settings.dispatch.claimWindowDays)
  return {
    shipment: shipment && shipment.shippedAt
      ? { carrier: shipment.carrier, carrierLabel: shipment.carrier ? carrierLabel(settings, shipment.carrier) : null, trackingNumber: shipment.trackingNumber, shippedAt: shipment.shippedAt, deliveredAt: shipment.deliveredAt }
      : null,
    claims: rows.map(claim => ({
      id: claim.id, status: claim.status, description: claim.description, createdAt: claim.createdAt, resolutionNote: claim.resolutionNote,
      photoUrls: claim.photoFileIds.map((_, index) => claimPhotoUrl(order, claim.id, index)),
    })),
    claimUntil,
    canClaim: claimUntil !== null && dispatchToday() <= claimUntil,
    canMarkDelivered: order.status === 'shipped',
  }
}

/**
 * A customer reports a breakage: only on a delivered order, within the claim window (409 with the last
 * day otherwise). The photos are checked and re-encoded before anything is stored; the claim, its photos'
 * rows and the mails to the maker(s) and the customer are written in one transaction.
 */
export async function createClaim(event: H3Event, number: string, token: string | undefined) {
  const db = await useDB()
  const { order, user } = await orderForCustomer(db, event, number, token)
  const settings = await getSetting('engine', db)
  if (order.status !== 'delivered') throw dispatchStateError(order.number, order.status, 'a breakage can be reported once the parcel has been delivered')
  const lastDate = (await claimLastDate(db, order, settings.dispatch.claimWindowDays))!
  if (dispatchToday() > lastDate) {
    const { locale } = await getSetting('units', db)
    throw conflictError(`Breakages on order ${order.number} could be reported until ${formatDay(lastDate, locale, 'long')} (${settings.dispatch.claimWindowDays} days after delivery); please write to the workshop.`, { lastDate })
  }
  const form = await readClaimPhotoForm(event, 'photos', claimLimits.photosMax)
  const parsed = claimFormSchema.safeParse(form.fields)
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!
    throw fieldError(String(issue.path[0] ?? 'description'), issue.message)
  }
  const items = await db.select({ id: orderItems.id, title: orderItems.title }).from(orderItems).where(eq(orderItems.orderId, order.id))
  const unknown = parsed.data.itemIds.filter(id => !items.some(item => item.id === id))
  if (unknown.length) throw fieldError('itemIds', `order ${order.number} has no item ${unknown.join(', ')}`)
  const photos = await prepareClaimPhotos(form.files, 'photos')

  const stored: string[] = []
  try {
    return await db.transaction(async (tx) => {
      for (const photo of photos) {
        const row = await storeFile(tx, { data: photo.data, mime: photo.mime, purpose: 'claim_photo', originalName: photo.originalName, isPublic: false, uploadedBy: user?.id ?? null })
        stored.push(row.id)
      }
      const [claim] = await tx.insert(claims).values({ orderId: order.id, userId: user?.id ?? null, description: parsed.data.description, itemIds: parsed.data.itemIds, photoFileIds: stored }).returning()
      await queueClaimOpenedMails(tx, order, claim!, items)
      setResponseStatus(event, 201)
      return claimAnswer(order, claim!)
    })
  }
  catch (error) {
    const storage = await uploadStorage()
    await Promise.all(stored.map(id => storage.removeItem(id).catch(() => undefined)))
    throw error
  }
}

function claimAnswer(order: Pick<OrderRow, 'number' | 'userId'>, claim: ClaimRow) {
  return {
    id: claim.id, orderNumber: order.number, status: claim.status, description: claim.description, itemIds: claim.itemIds,
    photoUrls: claim.photoFileIds.map((_, index) => claimPhotoUrl(order, claim.id, index)), createdAt: claim.createdAt,
    resolutionNote: claim.resolutionNote, resolvedAt: claim.resolvedAt,
  }
}

async function queueClaimOpenedMails(tx: Transaction, order: OrderRow, claim: ClaimRow, items: { id: number, title: string }[]) {
  const site = String(useRuntimeConfig().siteUrl)
  const broken = claim.itemIds.length ? items.filter(item => claim.itemIds.includes(item.id)) : items
  const makers = await tx.select({ id: users.id, email: users.email }).from(users).where(eq(users.role, 'maker'))
  for (const maker of makers) {
    await queueMail(tx, {
      to: maker.email,
      subject: `Breakage reported on order ${order.number}`,
      dedupeKey: `claim-opened:${claim.id}:${maker.id}`,
      content: {
        heading: `Order ${order.number}: a breakage claim (#${claim.id})`,
        paragraphs: [`Reported as broken: ${broken.map(item => item.title).join(', ')}.`, `In the customer's words: ${claim.description}`, `${countOf(claim.photoFileIds.length, 'photo')} attached.`],
        action: { label: 'Answer the claim', url: `${site}/workshop/claims` },
      },
    })
  }
  await queueMail(tx, {
    to: order.email,
    subject: `We have your breakage report for order ${order.number}`,
    dedupeKey: `claim-received:${claim.id}`,
    content: {
      heading: 'Sorry it arrived damaged',
      paragraphs: [
        `We have your report (#${claim.id}) with ${countOf(claim.photoFileIds.length, 'photo')} about: ${broken.map(item => item.title).join(', ')}.`,
        'The workshop will look at it and write to you with a replacement or a refund. Please keep the parcel and its packing until then.',
        'Handle broken wax with care: the edges can be sharp.',
      ],
      action: { label: 'Your order', url: orderLink(order.number, order.userId !== null) },
    },
  })
}

/** The stored photo `index` of a claim, for the order's customer or the maker; 404 for anyone else or anything missing. */
export async function claimPhotoFile(event: H3Event, number: string, claimId: number, index: number, token: string | undefined) {
  const db = await useDB()
  const { order } = await orderForCustomer(db, event, number, token, { maker: true })
  const [claim] = await db.select().from(claims).where(and(eq(claims.id, claimId), eq(claims.orderId, order.id)))
  const fileId = claim?.photoFileIds[index]
  const [file] = fileId ? await db.select().from(files).where(eq(files.id, fileId)) : []
  if (!file) throw notFoundError('No such photo.')
  return file
}

/** Claims for the maker, newest first, with the order, the customer's address, the items and the photos. */
export async function listClaims(db: Database, status: 'open' | 'replaced' | 'refunded' | 'declined' | 'all') {
  const rows = await db.select({ claim: claims, order: { number: orders.number, userId: orders.userId, email: orders.email, status: orders.status, currency: orders.currency } })
    .from(claims).innerJoin(orders, eq(orders.id, claims.orderId))
    .where(status === 'all' ? undefined : eq(claims.status, status)).orderBy(desc(claims.createdAt), desc(claims.id)).limit(200)
  const orderIds = [...new Set(rows.map(row => row.claim.orderId))]
  const items = orderIds.length
    ? await db.select({ id: orderItems.id, orderId: orderItems.orderId, title: orderItems.title, format: orderItems.format, quantity: orderItems.quantity }).from(orderItems).where(inArray(orderItems.orderId, orderIds))
    : []
  return rows.map(({ claim, order }) => {
    const ofOrder = items.filter(item => item.orderId === claim.orderId)
    return {
      id: claim.id,
      orderNumber: order.number,
      orderStatus: order.status,
      customerEmail: order.email,
      items: (claim.itemIds.length ? ofOrder.filter(item => claim.itemIds.includes(item.id)) : ofOrder).map(({ orderId: _, ...item }) => item),
      description: claim.description,
      photoUrls: claim.photoFileIds.map((_, index) => claimPhotoUrl(order, claim.id, index)),
      status: claim.status,
      resolutionNote: claim.resolutionNote,
      amountMinor: claim.amountMinor,
      currency: order.currency,
      createdAt: claim.createdAt,
      resolvedAt: claim.resolvedAt,
    }
  })
}
