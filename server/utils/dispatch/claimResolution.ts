import { and, eq, ne, sum } from 'drizzle-orm'
import { claims, orderItems, orders, refunds } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type ClaimAction = ClaimResolutionInput['action']
const statusFor: Record<ClaimAction, 'replaced' | 'refunded' | 'declined'> = { replace: 'replaced', refund: 'refunded', decline: 'declined' }

async function brokenItems(tx: Database | Transaction, claim: ClaimRow) {
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, claim.orderId)).orderBy(orderItems.id)
  return claim.itemIds.length ? items.filter(item => claim.itemIds.includes(item.id)) : items
}

async function queueClaimAnswerMail(tx: Transaction, order: OrderRow, claim: ClaimRow, text: string) {
  await queueMail(tx, {
    to: order.email,
    subject: `Your breakage report for order ${order.number}`,
    dedupeKey: `claim-answered:${claim.id}`,
    content: {
      heading: `About your breakage report #${claim.id}`,
      paragraphs: [text, `The workshop's note: ${claim.resolutionNote}`],
      action: { label: 'Your order', url: orderLink(order.number, order.userId !== null) },
    },
  })
}

/** Takes the claim's one answer: a conditional move from open, so a second answer (or a second click) is a 409. */
async function takeClaim(tx: Transaction, claimId: number, action: ClaimAction, input: ClaimResolutionInput, makerId: number) {
  const [claim] = await tx.select().from(claims).where(eq(claims.id, claimId)).for('update')
  if (!claim) throw notFoundError('No such claim.')
  if (claim.status !== 'open') throw conflictError(`Claim #${claim.id} has already been answered (${claim.status}).`, { status: claim.status })
  const [taken] = await tx.update(claims).set({ status: statusFor[action], resolutionNote: input.note, resolvedBy: makerId, resolvedAt: new Date() })
    .where(and(eq(claims.id, claimId), eq(claims.status, 'open'))).returning()
  if (!taken) throw conflictError(`Claim #${claim.id} has already been answered.`)
  const [order] = await tx.select().from(orders).where(eq(orders.id, claim.orderId))
  return { claim: taken, order: order! }
}

/** The default refund: what the broken items cost (with their tax), at most what is left to refund. */
async function claimRefundAmount(db: Database, claim: ClaimRow, requested: number | undefined) {
  const [order] = await db.select().from(orders).where(eq(orders.id, claim.orderId))
  const [asked] = await db.select({ total: sum(refunds.amountMinor) }).from(refunds).where(and(eq(refunds.orderId, claim.orderId), ne(refunds.status, 'failed')))
  const remaining = order!.totalMinor - Math.max(Number(asked?.total ?? 0), order!.refundedMinor)
  if (requested !== undefined) return requested
  const value = (await brokenItems(db, claim)).reduce((total, item) => total + item.lineTotalMinor + item.taxMinor, 0)
  if (remaining <= 0) throw fieldError('amountMinor', 'nothing is left to refund on this order')
  return Math.min(value, remaining)
}

/**
 * The maker's one answer to a breakage claim. Replace: a new production ticket for each broken item
 * (the order goes back into production and through dispatch again). Refund: through the shop's refund
 * flow (`requestRefund`), by default the broken items' value; if the payment service refuses, the claim
 * is open again. Decline: the note says why. The customer is mailed the answer.
 */
export async function resolveClaim(db: Database, claimId: number, input: ClaimResolutionInput, makerId: number) {
  if (input.action !== 'refund') {
    return await db.transaction(async (tx) => {
      const { claim, order } = await takeClaim(tx, claimId, input.action, input, makerId)
      let tickets: { id: number }[] = []
      if (input.action === 'replace') {
        const items = await brokenItems(tx, claim)
        tickets = await openReplacementTickets(tx, order.id, items.map(item => item.id), `Replacement for breakage claim #${claim.id}.`, makerId)
        await queueClaimAnswerMail(tx, order, claim, `We will make ${items.map(item => item.title).join(', ')} again and send ${items.length === 1 ? 'it' : 'them'} to you; you can follow it on your order page.`)
      }
      else {
        await queueClaimAnswerMail(tx, order, claim, 'We have looked at your report and are not able to replace or refund this time.')
      }
      return { id: claim.id, status: claim.status, resolutionNote: claim.resolutionNote, resolvedAt: claim.resolvedAt, ticketIds: tickets.map(ticket => ticket.id) }
    })
  }
  const [existing] = await db.select().from(claims).where(eq(claims.id, claimId))
  if (!existing) throw notFoundError('No such claim.')
  if (existing.status !== 'open') throw conflictError(`Claim #${existing.id} has already been answered (${existing.status}).`, { status: existing.status })
  const amountMinor = await claimRefundAmount(db, existing, input.amountMinor)
  const { order } = await db.transaction(tx => takeClaim(tx, claimId, 'refund', input, makerId))
  let refund: Awaited<ReturnType<typeof requestRefund>>
  try {
    refund = await requestRefund(db, order.number, { amountMinor, reason: `Breakage claim #${claimId}: ${input.note}`.slice(0, 500), restock: false }, makerId)
  }
  catch (error) {
    // No refund was made: the claim is open again, so the maker can answer it another way or try again.
    await db.update(claims).set({ status: 'open', resolutionNote: '', resolvedBy: null, resolvedAt: null }).where(and(eq(claims.id, claimId), eq(claims.status, 'refunded')))
    throw error
  }
  return await db.transaction(async (tx) => {
    const [claim] = await tx.update(claims).set({ amountMinor: refund.amountMinor, refundId: refund.refundId }).where(eq(claims.id, claimId)).returning()
    await queueClaimAnswerMail(tx, order, claim!, `We are refunding ${formatMoney(refund.amountMinor, order.currency)} to the card you paid with; it may take a few days to show.`)
    return { id: claim!.id, status: claim!.status, resolutionNote: claim!.resolutionNote, resolvedAt: claim!.resolvedAt, amountMinor: refund.amountMinor, refundId: refund.refundId }
  })
}
