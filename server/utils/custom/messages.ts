import { and, asc, eq, inArray, ne, sql } from 'drizzle-orm'
import { customMessages, files, orderItems, orders, proofs, tickets } from '../../db/schema'
import type { CustomMessageOrder } from '../../../shared/utils/customSchemas'
import type { EngineSettings } from '../../../shared/utils/engineSettings'
import type { MessageQuote } from '../../../shared/utils/messageQuote'
import type { Database, Transaction } from '../platform/db'
import type { CartItemInput } from '../../../shared/utils/shopSchemas'
import type { QuoteLine } from '../shop/cart'
import { quoteCart } from '../shop/cart'

type Db = Database | Transaction
type CartQuote = Awaited<ReturnType<typeof quoteCart>>

/** One message of a checkout, quoted again by the server: what the order item and its row are made of. */
export interface PreparedMessage {
  input: CustomMessageOrder
  quote: MessageQuote
  rpm: number
  voiceFileId: string | null
  voiceSeconds: number | null
  title: string
}

export const messageItemTitle = (occasion: string, recipientName: string) => `Personal message — ${occasion} for ${recipientName}`.slice(0, 200)

/**
 * The customer's recording for message `index`: an upload of purpose `voice` by this customer (or by a
 * visitor not signed in), linked to no other order's message (one given up unpaid frees it), measured
 * again from its bytes. Requests naming one recording take turns (an advisory lock), so two checkouts
 * cannot both take it.
 */
async function voiceForMessage(tx: Transaction, index: number, fileId: string | undefined, userId: number | null) {
  const field = `customMessages.${index}.voiceUploadId`
  if (!fileId) throw fieldError(field, 'upload your recording first (voice "upload" needs it)')
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`voice:${fileId}`}))`)
  const [file] = await tx.select().from(files).where(and(eq(files.id, fileId), eq(files.purpose, 'voice')))
  if (!file || (file.uploadedBy !== null && file.uploadedBy !== userId)) throw fieldError(field, 'no recording of yours has this id; upload it again')
  const [taken] = await tx.select({ number: orders.number }).from(customMessages)
    .innerJoin(orderItems, eq(orderItems.id, customMessages.orderItemId)).innerJoin(orders, eq(orders.id, orderItems.orderId))
    .where(and(eq(customMessages.voiceFileId, fileId), ne(orders.status, 'cancelled'))).limit(1)
  if (taken) throw fieldError(field, `this recording already belongs to order ${taken.number}; upload it again for a new message`)
  const data = await readStoredFile(file.id)
  if (!data) throw fieldError(field, 'the recording is no longer stored; upload it again')
  return { id: file.id, seconds: checkAudioSample(data, file.mime).seconds }
}

/**
 * Quotes each message of a checkout again on the server, exactly as `POST /api/custom/quote` does, and
 * refuses (400 naming `customMessages.<n>.<field>`) anything that quote would refuse.
 */
export async function prepareCheckoutMessages(tx: Transaction, messages: CustomMessageOrder[], userId: number | null, settings: EngineSettings, today = shopToday()): Promise<PreparedMessage[]> {
  const prepared: PreparedMessage[] = []
  for (const [index, input] of messages.entries()) {
    const voice = input.voice === 'upload' ? await voiceForMessage(tx, index, input.voiceUploadId, userId) : null
    const quote = quoteCustomMessage({ ...input, voiceSeconds: voice?.seconds }, today, settings)
    const refusal = quote.reasons[0]
    if (refusal) throw fieldError(`customMessages.${index}.${refusal.field === 'voiceSeconds' ? 'voiceUploadId' : refusal.field}`, refusal.message)
    prepared.push({ input, quote, rpm: input.rpm ?? settings.standardRpm, voiceFileId: voice?.id ?? null, voiceSeconds: voice?.seconds ?? null, title: messageItemTitle(input.occasion, input.recipientName) })
  }
  return prepared
}

/**
 * The cart's quote with the messages added: each message is one cylinder at its quoted price, taxed and
 * shipped as a cylinder. `messageLines` stand beside the cart's lines for the payment page (no product).
 */
export function quoteWithMessages(quote: CartQuote, messages: PreparedMessage[], settings: EngineSettings) {
  if (messages.length === 0) return { ...quote, messageLines: [] as QuoteLine[] }
  const priced = priceCart({
    lines: [
      ...quote.lines.map(line => ({ kind: 'recorded' as const, title: line.title, unitPriceMinor: line.unitPriceMinor, quantity: line.qty })),
      ...messages.map(message => ({ kind: 'recorded' as const, title: message.title, unitPriceMinor: message.quote.price.totalMinor, quantity: 1 })),
    ],
    shippingZoneId: quote.zone,
    taxRegionId: quote.taxRegion,
  }, settings)
  const messageLines: QuoteLine[] = messages.map((message, index) => {
    const line = priced.lines[quote.lines.length + index]!
    return {
      slug: `personal-message-${index + 1}`, productId: 0, title: message.title, kind: 'custom', format: message.input.format, qty: 1,
      unitPriceMinor: line.unitPriceMinor, lineTotalMinor: line.lineTotalMinor, taxMinor: line.taxMinor, stock: 0, madeToOrder: true,
    }
  })
  return { ...quote, messageLines, subtotalMinor: priced.subtotalMinor, shippingMinor: priced.shippingMinor, taxMinor: priced.taxMinor, totalMinor: priced.totalMinor }
}

/** Writes each message as an order item of kind `custom` (made to order) with its wishes and its quote. */
export async function insertMessageItems(tx: Transaction, orderId: number, messages: PreparedMessage[], lines: QuoteLine[]) {
  for (const [index, message] of messages.entries()) {
    const { input } = message
    const line = lines[index]!
    const [item] = await tx.insert(orderItems).values({
      orderId, productId: null, kind: 'custom', title: message.title, format: input.format, quantity: 1,
      unitPriceMinor: line.unitPriceMinor, lineTotalMinor: line.lineTotalMinor, taxMinor: line.taxMinor, madeToOrder: true,
      // The ticket's wishes are written from these (ticketWishesFromDetails).
      details: { occasion: input.occasion, recipient: input.recipientName, wishedDate: input.wishedDate, script: input.script, note: input.notes, rush: input.rush, ...(message.voiceFileId ? { voiceFileId: message.voiceFileId } : {}) },
    }).returning({ id: orderItems.id })
    await tx.insert(customMessages).values({
      orderItemId: item!.id, occasion: input.occasion, recipientName: input.recipientName, script: input.script, voice: input.voice,
      voiceFileId: message.voiceFileId, voiceSeconds: message.voiceSeconds, rpm: message.rpm, rush: input.rush, wishedDate: input.wishedDate,
      notes: input.notes, quote: { fit: message.quote.fit, spokenSeconds: message.quote.spokenSeconds, price: message.quote.price, earliestDate: message.quote.earliestDate },
    })
  }
}

/** The due date of each message item of an order (wished-for date, or the lead time from payment if later). */
export async function messageDueDates(db: Db, itemIds: number[], paidAt: Date, settings: EngineSettings): Promise<Map<number, string>> {
  if (itemIds.length === 0) return new Map()
  const rows = await db.select().from(customMessages).where(inArray(customMessages.orderItemId, itemIds))
  return new Map(rows.map(row => [row.orderItemId, messageDueDate(row.wishedDate, shopToday(paidAt), row.rush, settings)]))
}

/**
 * One mail to the customer once a paid order's messages are in the workshop: what was ordered and the
 * wished-for date. Sent once per order however often payment is confirmed. Given the order row the
 * payment just wrote (or read, locked), so it is not read again.
 */
export async function queueMessagesReceivedMail(tx: Db, order: Pick<OrderRow, 'id' | 'number' | 'email' | 'userId'>) {
  const orderId = order.id
  const rows = await tx.select({ message: customMessages, dueDate: tickets.dueDate }).from(customMessages)
    .innerJoin(orderItems, eq(orderItems.id, customMessages.orderItemId))
    .leftJoin(tickets, eq(tickets.orderItemId, orderItems.id))
    .where(eq(orderItems.orderId, orderId)).orderBy(asc(customMessages.id))
  if (rows.length === 0) return
  const locale = await mailLocale(tx)
  const day = (isoDate: string) => mailDate(isoDate, locale)
  await queueMail(tx, {
    to: order.email,
    subject: `Your personal message is in the workshop — order ${order.number}`,
    dedupeKey: `messages-received:${order.number}`,
    content: {
      heading: 'We have your personal message',
      paragraphs: [
        ...rows.map(({ message, dueDate }) => `${message.occasion} for ${message.recipientName}: wished for by ${day(message.wishedDate)}${dueDate && dueDate !== message.wishedDate ? ` (the proof will be ready by ${day(dueDate)})` : ''}.`),
        'The maker cuts your message on a tested blank and sends you a proof to hear. You approve it, or ask for a re-cut with a note, from your order page; the record is finished only once you have approved it.',
      ],
      action: { label: 'Follow your order', url: orderLink(order.number, order.userId !== null) },
    },
  })
}

/** The first `count` words of a script, with an ellipsis if there is more. */
export function scriptStart(script: string, count = 12): string {
  const words = script.trim().split(/\s+/u).filter(Boolean)
  return words.length > count ? `${words.slice(0, count).join(' ')} …` : words.join(' ')
}

/** The address of a proof's recording; a guest's carries the order's signed token. */
export function proofAudioUrl(orderNumber: string, proofId: number, guest: boolean): string {
  return `/api/orders/${orderNumber}/proofs/${proofId}/audio${guest ? `?t=${orderAccessToken(orderNumber)}` : ''}`
}

/** The messages of an order for its page: wishes, price, re-cuts and every proof with its answer. */
export async function orderMessages(db: Db, order: { id: number, number: string, userId: number | null }) {
  const rows = await db.select({ message: customMessages, format: orderItems.format, ticketId: tickets.id, recuts: tickets.recuts }).from(customMessages)
    .innerJoin(orderItems, eq(orderItems.id, customMessages.orderItemId))
    .leftJoin(tickets, eq(tickets.orderItemId, orderItems.id))
    .where(eq(orderItems.orderId, order.id)).orderBy(asc(customMessages.id))
  if (rows.length === 0) return []
  const settings = await getSetting('engine', db)
  const ticketIds = rows.map(row => row.ticketId).filter((id): id is number => id !== null)
  const proofRows = ticketIds.length ? await db.select().from(proofs).where(inArray(proofs.ticketId, ticketIds)).orderBy(asc(proofs.createdAt), asc(proofs.id)) : []
  return rows.map(({ message, format, ticketId, recuts }) => ({
    itemId: message.orderItemId,
    occasion: message.occasion,
    recipientName: message.recipientName,
    scriptStart: scriptStart(message.script),
    voice: message.voice,
    format,
    rpm: message.rpm,
    rush: message.rush,
    wishedDate: message.wishedDate,
    priceParts: ((message.quote as { price?: { parts?: unknown[] } }).price?.parts ?? []) as MessageQuote['price']['parts'],
    recutsUsed: recuts ?? 0,
    freeRecutsLeft: Math.max(0, settings.custom.freeRecuts - (recuts ?? 0)),
    proofs: proofRows.filter(proof => proof.ticketId === ticketId).map(proof => ({
      id: proof.id,
      createdAt: proof.createdAt,
      note: proof.note,
      answer: proof.answer,
      answerNote: proof.answerNote,
      answeredAt: proof.answeredAt,
      audioUrl: proof.fileId ? proofAudioUrl(order.number, proof.id, order.userId === null) : null,
    })),
  }))
}

/**
 * The cart page's quote: the cart's lines at today's prices with the personal messages beside them,
 * each quoted again as the checkout will (a message the checkout would refuse is a 400 here already).
 */
export async function quoteCartWithMessages(db: Database, input: { items?: CartItemInput[] | undefined, customMessages?: CustomMessageOrder[] | undefined, zone?: string | undefined, taxRegion?: string | undefined }, userId: number | null) {
  return await db.transaction(async (tx) => {
    const settings = await getSetting('engine', tx)
    const messages = await prepareCheckoutMessages(tx, input.customMessages ?? [], userId, settings)
    return quoteWithMessages(await quoteCart(tx, { ...input, items: input.items ?? [] }), messages, settings)
  })
}
