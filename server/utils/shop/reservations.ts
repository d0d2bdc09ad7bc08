import { and, eq, lt } from 'drizzle-orm'
import { orders } from '../../db/schema'

/**
 * Unpaid orders whose hold ran out: close their payment page, then give the stock back. The page is
 * closed first, so a payment cannot slip in after the stock is released; if it was paid meanwhile,
 * closing fails and the completed-payment event settles the order instead.
 */
export async function sweepExpiredReservations(graceMs = 120_000) {
  const db = await useDB()
  const due = await db.select().from(orders)
    .where(and(eq(orders.status, 'awaiting_payment'), lt(orders.reservationExpiresAt, new Date(Date.now() - graceMs))))
    .limit(50)
  let released = 0
  for (const order of due) {
    if (order.checkoutSessionId) {
      const session = await useStripe().checkout.sessions.retrieve(order.checkoutSessionId).catch(() => null)
      if (!session) continue
      if (session.status === 'complete') {
        // Paid, but the event never reached us (or not yet): settle it the same way the webhook would.
        if (session.payment_status === 'paid') {
          const settled = await db.transaction(tx => settlePaidSession(tx, session))
          await settled.followUp?.()
        }
        continue
      }
      if (session.status === 'open') {
        const closed = await useStripe().checkout.sessions.expire(order.checkoutSessionId).then(() => true, () => false)
        if (!closed) continue
      }
    }
    const done = await db.transaction(tx => releaseReservation(tx, order.id, 'The hold on the stock ran out unpaid.'))
    if (done) released++
  }
  // A surface test's pass goes stale with time alone: blanks counted from the register follow each minute.
  await db.transaction(tx => refreshBlankStock(tx))
  return released
}
