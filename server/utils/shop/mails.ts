import { and, asc, desc, eq, like } from 'drizzle-orm'
import { orderEvents, orderItems, orders, tickets, users } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

/*
 * The mails an order's life sends beside the customer's confirmation: the maker hears of every paid
 * order (what to make and by when, or what to pack), the customer hears when a cylinder made for them
 * is cut, and a declined card is told once the payment page has closed. Each is queued inside the
 * transaction of the change that causes it, with a dedupe key, so it goes once however often the change
 * is asked for.
 */

type Db = Database | Transaction

const site = () => String(useRuntimeConfig().siteUrl)
/**
 * A date kept as 2026-04-14 the way a mail writes it, in the shop's locale: "Tuesday, April 14, 2026"
 * (en-US) or "Tuesday 14 April 2026" (en-GB). Read at noon UTC so no time zone moves the day.
 */
export function mailDate(isoDate: string, locale: string): string {
  return new Intl.DateTimeFormat(locale, { dateStyle: 'full', timeZone: 'UTC' }).format(new Date(`${isoDate}T12:00:00Z`))
}

/** The shop's locale (Shop settings) for the dates of a mail, read in the mail's own transaction. */
export async function mailLocale(tx: Db): Promise<string> {
  return (await getSetting('units', tx)).locale
}

/**
 * To every maker, once per paid order: the cylinders to cut with their due dates, or, for an order of
 * stock items only, that it waits in the packing queue. Called after the order's tickets are opened.
 */
export async function queueMakerPaidOrderMail(tx: Db, orderId: number) {
  const [order] = await tx.select().from(orders).where(eq(orders.id, orderId))
  if (!order?.paidAt) return
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, orderId)).orderBy(asc(orderItems.id))
  const due = await tx.select({ orderItemId: tickets.orderItemId, dueDate: tickets.dueDate }).from(tickets).where(eq(tickets.orderId, orderId))
  const dueOf = new Map<number, string>()
  for (const ticket of due) {
    if (ticket.dueDate && (!dueOf.has(ticket.orderItemId) || ticket.dueDate < dueOf.get(ticket.orderItemId)!)) dueOf.set(ticket.orderItemId, ticket.dueDate)
  }
  const locale = await mailLocale(tx)
  const longDate = (isoDate: string) => mailDate(isoDate, locale)
  const toMake = items.filter(item => item.madeToOrder || item.kind === 'custom')
  const toPack = items.filter(item => !toMake.includes(item))
  const makes = toMake.length > 0
  const paragraphs = makes
    ? [
        'To make:',
        ...toMake.map(item => `${item.quantity} × ${item.title}${dueOf.get(item.id) ? ` — due ${longDate(dueOf.get(item.id)!)}` : ''}`),
        ...(toPack.length ? ['From stock, packed with them:', ...toPack.map(item => `${item.quantity} × ${item.title}`)] : []),
        'The production tickets are open on the tickets board.',
      ]
    : [
        'Nothing to make: every item comes from stock, and the order waits in the packing queue.',
        ...toPack.map(item => `${item.quantity} × ${item.title}`),
      ]
  const makers = await tx.select({ id: users.id, email: users.email }).from(users).where(eq(users.role, 'maker')).orderBy(asc(users.id))
  for (const maker of makers) {
    await queueMail(tx, {
      to: maker.email,
      subject: makes ? `Paid order ${order.number}: ${countOf(toMake.reduce((sum, item) => sum + item.quantity, 0), 'cylinder')} to make` : `Paid order ${order.number}: to pack`,
      dedupeKey: `maker-paid:${order.number}:${maker.id}`,
      content: {
        heading: makes ? `Order ${order.number} is paid: cylinders to make` : `Order ${order.number} is paid: to pack`,
        paragraphs,
        action: makes
          ? { label: 'Open the tickets board', url: `${site()}/workshop/tickets` }
          : { label: 'Open the packing queue', url: `${site()}/dispatch` },
      },
    })
  }
}

/**
 * To the customer, once per order item (a re-cut sends nothing more): a cylinder made for them has been
 * cut, with the date it is due to leave the workshop.
 */
export async function queueCylinderCutMail(tx: Db, ticket: { orderId: number, orderItemId: number, dueDate: string | null }) {
  const [order] = await tx.select().from(orders).where(eq(orders.id, ticket.orderId))
  const [item] = await tx.select().from(orderItems).where(eq(orderItems.id, ticket.orderItemId))
  if (!order || !item) return
  const dispatch = ticket.dueDate ? `It is due to be ready for dispatch by ${mailDate(ticket.dueDate, await mailLocale(tx))}; we tell you when the parcel leaves.` : 'We tell you when the parcel leaves.'
  await queueMail(tx, {
    to: order.email,
    subject: `Your cylinder has been cut (order ${order.number})`,
    dedupeKey: `cylinder-cut:${ticket.orderItemId}`,
    content: {
      heading: 'Your cylinder has been cut',
      paragraphs: [
        `${item.title}, of order ${order.number}, has been cut on a tested blank.`,
        item.kind === 'custom' ? `${dispatch} A personal message may first come to you as a proof to hear and approve.` : dispatch,
      ],
      action: { label: 'Follow your order', url: orderLink(order.number, order.userId !== null) },
    },
  })
}

/**
 * To the customer, once the payment page of an order whose card was declined has closed unpaid
 * (expired, or left): nothing was charged. A decline the customer put right on the same page sends
 * nothing, since the order is then paid; an order without a decline (simply abandoned) sends nothing.
 */
export async function queueDeclinedPaymentMail(tx: Db, orderId: number) {
  const [order] = await tx.select().from(orders).where(eq(orders.id, orderId))
  if (!order || order.status !== 'cancelled' || order.paidAt) return
  const [decline] = await tx.select({ note: orderEvents.note }).from(orderEvents)
    .where(and(eq(orderEvents.orderId, orderId), like(orderEvents.note, 'Card declined:%'))).orderBy(desc(orderEvents.id)).limit(1)
  if (!decline) return
  const reason = decline.note!.slice('Card declined:'.length).trim()
  await queueMail(tx, {
    to: order.email,
    subject: `Payment for order ${order.number} did not go through`,
    dedupeKey: `payment-failed:${order.number}`,
    content: {
      heading: 'Your payment did not go through',
      paragraphs: [
        `The card payment for order ${order.number} was declined${reason && reason !== 'no reason given' ? ` (${reason})` : ''}, and the payment page has closed. Nothing was charged.`,
        'The cylinders we held for you are back on sale; your cart is still in your browser, so you can check out again with the same or another card.',
      ],
      action: { label: 'Back to your cart', url: `${site()}/cart` },
    },
  })
}
