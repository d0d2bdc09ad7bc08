import { and, asc, desc, eq, gte, ne, sql } from 'drizzle-orm'
import { blanks, orderItems, orders, products, recorders, surfaceTests, testCuts, ticketEvents, tickets, users, waxBatches } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction
type TicketStageValue = TicketRow['stage']

const ticketNotFound = () => notFoundError('No such ticket.')

/** A date `days` after `from`, as the calendar date (UTC) a ticket is due. */
export function ticketDueDate(from: Date, days = ticketLeadTimeDays): string {
  const due = new Date(from.getTime() + days * 86_400_000)
  return due.toISOString().slice(0, 10)
}

const wishFields: [string, string][] = [
  ['wishes', ''], ['occasion', 'Occasion'], ['wishedDate', 'Wished for by'], ['recipient', 'For'],
  ['dedication', 'Dedication'], ['script', 'Script'], ['note', 'Note'], ['rush', 'Rush'],
]

/** What the customer asked for, from an order item's details, as one readable text for the maker. */
export function ticketWishesFromDetails(details: Record<string, unknown> | null | undefined): string {
  if (!details) return ''
  const parts: string[] = []
  for (const [key, label] of wishFields) {
    const value = details[key]
    if (value === undefined || value === null || value === '' || value === false) continue
    const text = value === true ? 'yes' : String(value).trim()
    parts.push(label ? `${label}: ${text}` : text)
  }
  if (typeof details.voiceFileId === 'string') parts.push('The customer sent a voice recording.')
  return parts.join('\n').slice(0, 4000)
}

export async function logTicketEvent(tx: Db, ticketId: number, from: TicketStageValue | null, to: TicketStageValue, note: string | null, actorUserId: number | null) {
  await tx.insert(ticketEvents).values({ ticketId, fromStage: from, toStage: to, note: note || null, actorUserId })
}

/**
 * Opens one ticket per cylinder to make (each unit of each made-to-order or custom item) for a
 * paid order, and moves the order from paid to in production. Idempotent: the unique (item, unit)
 * index skips tickets that exist. An unpaid order gets none. Given the row the payment just wrote, the
 * order is not read again; given its id, it is read and locked.
 */
export async function createTicketsForOrder(tx: Db, paidOrder: number | OrderRow): Promise<number> {
  const [order] = typeof paidOrder === 'number' ? await tx.select().from(orders).where(eq(orders.id, paidOrder)).for('update') : [paidOrder]
  if (!order || !order.paidAt || !['paid', 'in_production'].includes(order.status)) return 0
  const orderId = order.id
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, orderId))
  const toMake = items.filter(item => item.madeToOrder || item.kind === 'custom')
  if (toMake.length === 0) {
    // Nothing to cut: stock cylinders and blanks go straight to the shipper.
    await moveOrder(tx, order, ['paid'], 'ready_to_pack', {}, 'Nothing to make: the stock items go straight to packing.')
    return 0
  }
  const settings = await getSetting('engine', tx)
  const dueDate = ticketDueDate(order.paidAt, settings.production.leadTimeDays)
  // A personal message is due on its wished-for date, or after its lead time if that is later.
  const messageDue = await messageDueDates(tx, toMake.filter(item => item.kind === 'custom').map(item => item.id), order.paidAt, settings)
  const rows = toMake.flatMap(item => Array.from({ length: item.quantity }, (_, index) => ({
    orderId, orderItemId: item.id, unit: index + 1, format: item.format, dueDate: messageDue.get(item.id) ?? dueDate, wishes: ticketWishesFromDetails(item.details),
  })))
  const created = await tx.insert(tickets).values(rows).onConflictDoNothing({ target: [tickets.orderItemId, tickets.unit] }).returning({ id: tickets.id })
  for (const ticket of created) await logTicketEvent(tx, ticket.id, null, 'queued', `Opened for paid order ${order.number}.`, null)
  if (messageDue.size > 0) await queueMessagesReceivedMail(tx, order)
  await moveOrder(tx, order, ['paid'], 'in_production', {}, `${countOf(rows.length, 'cylinder')} to cut: ${countOf(rows.length, 'production ticket')} opened.`)
  return created.length
}

/** Keeps the order's state in step with its tickets (all at dispatch → ready to pack; a proof out → proof pending). */
export async function syncOrderWithTickets(tx: Db, orderId: number, actorUserId: number | null) {
  const rows = await tx.select({ stage: tickets.stage }).from(tickets).where(eq(tickets.orderId, orderId))
  const wanted = orderStateForTickets(rows.map(row => row.stage))
  if (wanted === 'ready_to_pack') {
    await moveOrder(tx, orderId, ['paid', 'in_production', 'proof_pending'], 'ready_to_pack', {}, 'Every cylinder of the order is cut and ready for dispatch.', actorUserId ?? undefined)
  }
  else if (wanted === 'proof_pending') {
    await moveOrder(tx, orderId, ['paid', 'in_production'], 'proof_pending', {}, 'A proof is waiting for the customer.', actorUserId ?? undefined)
  }
  else if (wanted === 'in_production') {
    await moveOrder(tx, orderId, ['paid', 'proof_pending', 'ready_to_pack'], 'in_production', {}, 'A cylinder of the order is being cut (again).', actorUserId ?? undefined)
  }
}

/** The latest surface test of the blank's current surface, or null. */
export async function latestCurrentSurfaceTest(db: Db, blank: Pick<BlankRow, 'id' | 'surfacesUsed'>) {
  const [test] = await db.select().from(surfaceTests)
    .where(and(eq(surfaceTests.blankId, blank.id), eq(surfaceTests.surface, blank.surfacesUsed + 1)))
    .orderBy(desc(surfaceTests.testedAt), desc(surfaceTests.id)).limit(1)
  return test ?? null
}

/** The open ticket (other than `exceptTicketId`) that holds a blank, with its order number. */
export async function openTicketHoldingBlank(db: Db, blankId: number, exceptTicketId?: number) {
  const holder = await blankHolderOf(db, blankId, exceptTicketId)
  return holder ? { id: holder.ticketId, orderNumber: holder.orderNumber } : null
}

/**
 * The wax the ticket's cylinder is made of: the catalogue item's formula; a personal message (or an
 * item without one) takes the shop's first formula.
 */
export async function ticketWantedFormula(db: Db, ticket: Pick<TicketRow, 'orderItemId'>): Promise<string> {
  const [row] = await db.select({ kind: orderItems.kind, formula: products.waxFormulaId }).from(orderItems)
    .leftJoin(products, eq(products.id, orderItems.productId)).where(eq(orderItems.id, ticket.orderItemId))
  const { defaultId } = await shopWaxFormulas(db)
  return row?.kind !== 'custom' && row?.formula ? row.formula : defaultId
}

/** The oldest a passing test may be and still count (the shop's `passMaxAgeDays`). */
async function freshPassSince(db: Db): Promise<Date> {
  const { passMaxAgeDays } = await getSetting('surface', db)
  return new Date(Date.now() - passMaxAgeDays * 86_400_000)
}

/**
 * Blanks a ticket of `format` (and, when given, of that wax formula) may take: state tested_pass, the
 * latest test of the current surface passed within the shop's `passMaxAgeDays`, and no open ticket holds
 * it. Quietest first. The same rule the assignment enforces. A batch without a formula counts as the
 * shop's first.
 */
export async function eligibleBlanks(db: Db, format: BlankRow['format'], options: { code?: string, limit?: number, waxFormulaId?: string } = {}) {
  const latest = db.select({
    finalVerdict: surfaceTests.finalVerdict,
    aWeightedDbfs: surfaceTests.aWeightedDbfs,
    rotaryDb: surfaceTests.rotaryDb,
    clicksPerMinute: surfaceTests.clicksPerMinute,
    testedAt: surfaceTests.testedAt,
  }).from(surfaceTests)
    .where(and(eq(surfaceTests.blankId, blanks.id), eq(surfaceTests.surface, sql`${blanks.surfacesUsed} + 1`)))
    .orderBy(desc(surfaceTests.testedAt), desc(surfaceTests.id)).limit(1).as('latest_test')
  const pattern = options.code ? containsPattern(options.code) : undefined
  const { defaultId } = await shopWaxFormulas(db)
  const formula = sql<string>`coalesce(${waxBatches.waxFormulaId}, ${defaultId})`
  return await db.select({
    id: blanks.id,
    code: blanks.code,
    format: blanks.format,
    diameterIn: blanks.diameterIn,
    surface: sql<number>`${blanks.surfacesUsed} + 1`,
    location: blanks.location,
    batchCode: waxBatches.code,
    waxFormulaId: formula,
    aWeightedDbfs: latest.aWeightedDbfs,
    rotaryDb: latest.rotaryDb,
    clicksPerMinute: latest.clicksPerMinute,
    testedAt: latest.testedAt,
  }).from(blanks)
    .innerJoinLateral(latest, sql`true`)
    .innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId))
    .where(and(
      eq(blanks.format, format),
      eq(blanks.state, 'tested_pass'),
      eq(latest.finalVerdict, 'pass'),
      gte(latest.testedAt, await freshPassSince(db)),
      options.waxFormulaId ? sql`${formula} = ${options.waxFormulaId}` : undefined,
      sql`not exists (select 1 from ${tickets} where ${tickets.blankId} = ${blanks.id} and ${tickets.stage} <> 'done')`,
      pattern ? sql`${blanks.code} ilike ${pattern}` : undefined,
    ))
    .orderBy(asc(latest.aWeightedDbfs), asc(blanks.code))
    .limit(options.limit ?? 50)
}

/** The blanks the ticket's picker offers: its format and its wax. */
export async function eligibleBlanksForTicket(db: Db, ticketId: number, code?: string) {
  const [ticket] = await db.select().from(tickets).where(eq(tickets.id, ticketId))
  if (!ticket) throw ticketNotFound()
  const waxFormulaId = await ticketWantedFormula(db, ticket)
  const { label } = await shopWaxFormulas(db)
  return { format: ticket.format, waxFormulaId, waxFormula: label(waxFormulaId), blanks: await eligibleBlanks(db, ticket.format, { code, waxFormulaId }) }
}

/**
 * Why this blank may not go to this ticket (a sentence for a 409), or null. A blank of another format
 * or wax than the order wants goes only with the maker's reason (`overrideReason`); a stale, incomplete
 * or failed test never.
 */
async function blankRefusal(db: Db, ticket: TicketRow, blank: BlankRow, overrideReason: string | undefined): Promise<string | null> {
  const wanted = await ticketWantedFormula(db, ticket)
  const { defaultId, label } = await shopWaxFormulas(db)
  const [batch] = await db.select({ waxFormulaId: waxBatches.waxFormulaId }).from(waxBatches).where(eq(waxBatches.id, blank.batchId))
  const blankFormula = batch?.waxFormulaId ?? defaultId
  const unless = ' Give a reason (overrideReason) to use it all the same.'
  if (blank.format !== ticket.format && !overrideReason) {
    return `Blank ${blank.code} is a ${blankFormatLabels[blank.format]} blank; ticket #${ticket.id} needs a ${blankFormatLabels[ticket.format]} one of ${label(wanted)} wax.${unless}`
  }
  if (blankFormula !== wanted && !overrideReason) {
    return `This order wants ${label(wanted)} wax; blank ${blank.code} is ${label(blankFormula)}.${unless}`
  }
  const holder = await openTicketHoldingBlank(db, blank.id, ticket.id)
  if (holder) return `Blank ${blank.code} is already held by ticket #${holder.id} (order ${holder.orderNumber}).`
  if (ticket.blankId === blank.id) return `Ticket #${ticket.id} already holds blank ${blank.code}.`
  if (blank.state !== 'tested_pass') {
    return `Blank ${blank.code} is ${blankStateLabels[blank.state].toLowerCase()}: only a blank whose current surface passed its test can be assigned.`
  }
  const test = await latestCurrentSurfaceTest(db, blank)
  if (!test) return `Blank ${blank.code} has no surface test on its current surface (${blank.surfacesUsed + 1}): test it first.`
  if (test.finalVerdict === 'incomplete') return `The latest test of blank ${blank.code}'s current surface (${blank.surfacesUsed + 1}) is incomplete: play the surface through to the end.`
  if (test.finalVerdict !== 'pass') return `The latest test of blank ${blank.code}'s current surface (${blank.surfacesUsed + 1}) failed.`
  if (test.testedAt < await freshPassSince(db)) {
    return `Blank ${blank.code} passed its surface test on ${test.testedAt.toISOString().slice(0, 10)}, longer ago than the shop's ${(await getSetting('surface', db)).passMaxAgeDays} days: it is stale, test it again.`
  }
  return null
}

/** Whether the blank differs from what the order wants (format or wax), so that the override reason is kept. */
async function blankIsOverride(db: Db, ticket: TicketRow, blank: BlankRow): Promise<boolean> {
  if (blank.format !== ticket.format) return true
  const [batch] = await db.select({ waxFormulaId: waxBatches.waxFormulaId }).from(waxBatches).where(eq(waxBatches.id, blank.batchId))
  return (batch?.waxFormulaId ?? (await shopWaxFormulas(db)).defaultId) !== await ticketWantedFormula(db, ticket)
}

function isOpenBlankViolation(error: unknown): boolean {
  return isUniqueViolation(error, 'tickets_open_blank')
}

/**
 * Ties a tested blank to a ticket (queued, or swapping the blank of one waiting for its cut). The
 * checks give the reasons; the partial unique index `tickets_open_blank` is what makes two open
 * tickets holding one blank impossible, however the requests interleave.
 */
export async function assignBlankToTicket(db: Database, ticketId: number, blankCode: string, actorUserId: number, overrideReason?: string) {
  let blankId: number | undefined
  try {
    return await db.transaction(async (tx) => {
      const [ticket] = await tx.select().from(tickets).where(eq(tickets.id, ticketId)).for('update')
      if (!ticket) throw ticketNotFound()
      const [order] = await tx.select({ status: orders.status }).from(orders).where(eq(orders.id, ticket.orderId))
      const kind = await ticketKindById(tx, ticket)
      const problem = ticketMoveProblem({ id: ticket.id, stage: ticket.stage, kind }, 'blank_assigned', order!.status, 'assign')
      if (problem) throw conflictError(problem)
      const blank = await findBlankByCode(tx, blankCode, { field: 'blankCode' })
      blankId = blank.id
      const refusal = await blankRefusal(tx, ticket, blank, overrideReason)
      if (refusal) throw conflictError(refusal)
      // The reason is kept only when the blank is not what the order wants; a matching blank clears it.
      const keptReason = overrideReason && await blankIsOverride(tx, ticket, blank) ? overrideReason : null

      const previous = ticket.blankId ? (await tx.select().from(blanks).where(eq(blanks.id, ticket.blankId)))[0] : undefined
      await tx.update(tickets).set({ blankId: blank.id, stage: 'blank_assigned', blankOverrideReason: keptReason, updatedAt: new Date() }).where(eq(tickets.id, ticket.id))
      const reserved = await moveBlank(tx, blank.id, { from: 'tested_pass', to: 'reserved', reason: `Reserved for ticket #${ticket.id}.`, byUserId: actorUserId, details: { ticketId: ticket.id } })
      if (!reserved) throw conflictError(`Blank ${blank.code} changed meanwhile; reload and choose again.`)
      let note = `Blank ${blank.code} assigned${keptReason ? ` (not what the order wants: ${keptReason})` : ''}.`
      if (previous) {
        // An uncut blank goes back on the shelf; one carrying a rejected cut stays cut, for the register to deal with.
        await moveBlank(tx, previous.id, { from: 'reserved', to: 'tested_pass', reason: `Released from ticket #${ticket.id}.`, byUserId: actorUserId, details: { ticketId: ticket.id } })
        note = `Blank changed from ${previous.code} to ${blank.code}.`
      }
      await logTicketEvent(tx, ticket.id, ticket.stage, 'blank_assigned', note, actorUserId)
      await syncOrderWithTickets(tx, ticket.orderId, actorUserId)
      return { id: ticket.id, stage: 'blank_assigned' as const, blankCode: blank.code, overrideReason: keptReason }
    })
  }
  catch (error) {
    if (blankId !== undefined && isOpenBlankViolation(error)) {
      const holder = await openTicketHoldingBlank(db, blankId, ticketId)
      throw conflictError(`Blank ${blankCode} is already held by ticket #${holder?.id ?? '?'}${holder ? ` (order ${holder.orderNumber})` : ''}.`)
    }
    throw error
  }
}

export async function ticketKindById(db: Db, ticket: Pick<TicketRow, 'orderItemId'>): Promise<TicketKind> {
  const [item] = await db.select({ kind: orderItems.kind }).from(orderItems).where(eq(orderItems.id, ticket.orderItemId))
  return ticketKindOf(item?.kind ?? 'recorded')
}

/** Locks the ticket for a move and returns it with its kind and its order's state; 404 when missing. */
export async function lockTicketForMove(tx: Transaction, ticketId: number) {
  const [ticket] = await tx.select().from(tickets).where(eq(tickets.id, ticketId)).for('update')
  if (!ticket) throw ticketNotFound()
  const [order] = await tx.select({ id: orders.id, number: orders.number, status: orders.status }).from(orders).where(eq(orders.id, ticket.orderId))
  return { ticket, order: order!, kind: await ticketKindById(tx, ticket) }
}

/** Checks that the ticket's blank can take the cut now: reserved for it, its current surface tested and passed. */
export async function blankReadyForCut(tx: Transaction, ticket: TicketRow): Promise<BlankRow> {
  const [blank] = ticket.blankId ? await tx.select().from(blanks).where(eq(blanks.id, ticket.blankId)) : []
  if (!blank) throw conflictError(`Ticket #${ticket.id} has no blank yet: assign a tested blank before recording the cut.`)
  if (blank.state === 'cut') throw conflictError(`Blank ${blank.code} carries the rejected cut: change the blank (assign a fresh tested one) before cutting again.`)
  if (blank.state !== 'reserved') throw conflictError(`Blank ${blank.code} is ${blankStateLabels[blank.state].toLowerCase()}, not reserved for this ticket: assign a tested blank again.`)
  const test = await latestCurrentSurfaceTest(tx, blank)
  if (test?.finalVerdict !== 'pass') throw conflictError(`Blank ${blank.code} has no passing test on its current surface: assign a tested blank.`)
  return blank
}

/** Marks the cut: ticket → cut with recorder, date and test cut; blank reserved → cut. */
export async function markTicketCut(tx: Transaction, ticket: TicketRow, blank: BlankRow, cut: { recorderId: number, cutAt: Date, testCutId: number | null, recorderName: string, note?: string }, actorUserId: number) {
  await tx.update(tickets).set({ stage: 'cut', recorderId: cut.recorderId, cutAt: cut.cutAt, cutTestId: cut.testCutId, updatedAt: new Date() }).where(eq(tickets.id, ticket.id))
  await moveBlank(tx, blank.id, { from: 'reserved', to: 'cut', reason: `Cut for ticket #${ticket.id} on ${cut.recorderName}.`, byUserId: actorUserId, details: { ticketId: ticket.id } })
  await logTicketEvent(tx, ticket.id, ticket.stage, 'cut', `Cut on ${blank.code} with ${cut.recorderName}${cut.testCutId ? ', with a test recording' : ''}.${cut.note ? ` ${cut.note}` : ''}`, actorUserId)
  // The customer hears of it once per order item, however often it is cut again.
  await queueCylinderCutMail(tx, ticket)
  await syncOrderWithTickets(tx, ticket.orderId, actorUserId)
}

/** A plain stage change or a recut, by the transition table; logged, and the order kept in step. */
export async function changeTicketStage(db: Database, ticketId: number, change: TicketStageChange, actorUserId: number) {
  return await db.transaction(async (tx) => {
    const { ticket, order, kind } = await lockTicketForMove(tx, ticketId)
    const problem = ticketMoveProblem({ id: ticket.id, stage: ticket.stage, kind }, change.to, order.status, 'stage')
    if (problem) throw conflictError(problem)
    const recut = change.to === 'recut' || change.to === 'blank_assigned'
    if (recut && !change.note) throw fieldError('note', 'say why the cylinder is cut again')
    if (kind === 'custom' && change.to === 'proof_sent') throw conflictError(`Ticket #${ticket.id} is a personal message: send the proof by uploading its recording (the proof form), so the customer can hear it.`)
    if (kind === 'custom' && change.to === 'approved' && !change.note) throw fieldError('note', 'say how the customer approved the proof (for example "approved by telephone")')
    const to: TicketStageValue = change.to === 'recut' ? 'blank_assigned' : change.to
    await tx.update(tickets).set({ stage: to, updatedAt: new Date() }).where(eq(tickets.id, ticket.id))
    // A proof still waiting is answered by this move, on the customer's behalf, with the maker's note.
    if (ticket.stage === 'proof_sent') await answerWaitingProofForCustomer(tx, ticket.id, to === 'approved' ? 'approved' : 'recut', change.note, actorUserId)
    if (to === 'done' && ticket.blankId) {
      await moveBlank(tx, ticket.blankId, { from: 'cut', to: 'shipped', reason: `Shipped with order ${order.number}.`, byUserId: actorUserId, details: { ticketId: ticket.id } })
    }
    await logTicketEvent(tx, ticket.id, ticket.stage, to, recut ? `Recut: ${change.note}` : change.note, actorUserId)
    await syncOrderWithTickets(tx, ticket.orderId, actorUserId)
    return { id: ticket.id, stage: to }
  })
}

/**
 * Proof moves of a personal message, each conditional on the stage it leaves (the caller has locked the
 * ticket with `lockTicketForMove`): the proof goes out (cut → proof_sent), the customer approves it
 * (proof_sent → approved), or asks for a re-cut (proof_sent → blank_assigned, counted in `recuts`).
 * Each returns false when the ticket was not at the stage the move leaves.
 */
export async function moveTicketForProof(tx: Db, ticket: TicketRow, move: 'sent' | 'approved' | 'recut', note: string, actorUserId: number | null): Promise<boolean> {
  const from: TicketStageValue = move === 'sent' ? 'cut' : 'proof_sent'
  const to: TicketStageValue = move === 'sent' ? 'proof_sent' : move === 'approved' ? 'approved' : 'blank_assigned'
  const [moved] = await tx.update(tickets)
    .set({ stage: to, updatedAt: new Date(), ...(move === 'recut' ? { recuts: sql`${tickets.recuts} + 1` } : {}) })
    .where(and(eq(tickets.id, ticket.id), eq(tickets.stage, from))).returning({ id: tickets.id })
  if (!moved) return false
  await logTicketEvent(tx, ticket.id, from, to, move === 'recut' ? `Recut: ${note}` : note, actorUserId)
  await syncOrderWithTickets(tx, ticket.orderId, actorUserId)
  return true
}

/** Closes the to-dispatch tickets of a shipped order (for dispatch to call when the parcel leaves). */
export async function closeTicketsOfShippedOrder(tx: Db, orderId: number, actorUserId: number | null) {
  const open = await tx.select().from(tickets).where(and(eq(tickets.orderId, orderId), eq(tickets.stage, 'to_dispatch')))
  let closed = 0
  for (const ticket of open) {
    // Conditional: a ticket another request closed meanwhile is neither closed nor logged twice.
    const [done] = await tx.update(tickets).set({ stage: 'done', updatedAt: new Date() }).where(and(eq(tickets.id, ticket.id), eq(tickets.stage, 'to_dispatch'))).returning({ id: tickets.id })
    if (!done) continue
    closed++
    if (ticket.blankId) await moveBlank(tx, ticket.blankId, { from: 'cut', to: 'shipped', reason: 'Shipped with its order.', byUserId: actorUserId, details: { ticketId: ticket.id } })
    await logTicketEvent(tx, ticket.id, 'to_dispatch', 'done', 'The order has shipped.', actorUserId)
  }
  return closed
}

/**
 * A fully refunded order makes nothing more: its open tickets are closed, and a blank that was only
 * reserved goes back to the tested blanks a new ticket can take. A blank already cut stays cut (the
 * recording exists, and the register shows it).
 */
export async function closeTicketsOfRefundedOrder(tx: Db, orderId: number) {
  const open = await tx.select().from(tickets).where(and(eq(tickets.orderId, orderId), ne(tickets.stage, 'done')))
  for (const ticket of open) {
    await tx.update(tickets).set({ stage: 'done', updatedAt: new Date() }).where(eq(tickets.id, ticket.id))
    if (ticket.blankId) await moveBlank(tx, ticket.blankId, { from: 'reserved', to: 'tested_pass', reason: `Released: the order of ticket #${ticket.id} was refunded in full.`, byUserId: null, details: { ticketId: ticket.id } })
    await logTicketEvent(tx, ticket.id, ticket.stage, 'done', 'The order was refunded in full: nothing more to make.', null)
  }
  return open.length
}

/** The ticket log, oldest first, with who made each change. */
export async function ticketHistory(db: Db, ticketId: number) {
  return await db.select({ id: ticketEvents.id, from: ticketEvents.fromStage, to: ticketEvents.toStage, note: ticketEvents.note, at: ticketEvents.at, actor: users.name })
    .from(ticketEvents).leftJoin(users, eq(users.id, ticketEvents.actorUserId))
    .where(eq(ticketEvents.ticketId, ticketId)).orderBy(asc(ticketEvents.at), asc(ticketEvents.id))
}

/** Who may read an order's certificates: its owner, the maker, or a guest holding the order's signed link. */
/**
 * The maker, the order's owner, a guest with the order's signed link, or (for one certificate, `ticketId`)
 * whoever holds that certificate's own key from the packing slip.
 */
export function mayReadOrderCertificates(user: { id: number, role: string } | null, order: { number: string, userId: number | null }, token: string | undefined, ticketId?: number): boolean {
  return user?.role === 'maker'
    || (user !== null && order.userId === user.id)
    || (token !== undefined && orderAccessTokenValid(order.number, token))
    || (token !== undefined && ticketId !== undefined && certificateAccessTokenValid(ticketId, token))
}

/** Stages at which a cylinder has been cut and its certificate can be issued. */
export const certifiedTicketStages: TicketStageValue[] = ['cut', 'proof_sent', 'approved', 'to_dispatch', 'done']

/** The test certificate of one made cylinder: the blank, its batch, the surface test it passed, the recorder and the dates. */
export async function ticketCertificate(db: Db, ticketId: number) {
  const [row] = await db.select({ ticket: tickets, order: orders, item: orderItems, blank: blanks, batch: waxBatches })
    .from(tickets)
    .innerJoin(orders, eq(orders.id, tickets.orderId))
    .innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .innerJoin(blanks, eq(blanks.id, tickets.blankId))
    .innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId))
    .where(eq(tickets.id, ticketId))
  if (!row || !row.ticket.cutAt || !certifiedTicketStages.includes(row.ticket.stage)) return null
  const { ticket, order, item, blank, batch } = row
  const test = await latestCurrentSurfaceTest(db, blank)
  const [recorder] = ticket.recorderId ? await db.select().from(recorders).where(eq(recorders.id, ticket.recorderId)) : []
  const [testCut] = ticket.cutTestId ? await db.select().from(testCuts).where(eq(testCuts.id, ticket.cutTestId)) : []
  const [ready] = await db.select({ at: ticketEvents.at }).from(ticketEvents)
    .where(and(eq(ticketEvents.ticketId, ticket.id), eq(ticketEvents.toStage, 'to_dispatch'))).orderBy(desc(ticketEvents.at)).limit(1)
  return {
    order: { number: order.number, userId: order.userId },
    certificate: {
      ticketId: ticket.id,
      orderNumber: order.number,
      title: item.title,
      format: item.format,
      unit: ticket.unit,
      quantity: item.quantity,
      blank: { code: blank.code, diameterIn: blank.diameterIn, surface: blank.surfacesUsed + 1 },
      batch: { code: batch.code, formula: batch.formula, waxFormula: (await shopWaxFormulas(db)).label(batch.waxFormulaId ?? (await shopWaxFormulas(db)).defaultId), pourDate: batch.pourDate, softeningPointC: batch.softeningPointC },
      blankOverrideReason: ticket.blankOverrideReason,
      surfaceTest: test && {
        testedAt: test.testedAt, rpm: test.rpm, aWeightedDbfs: test.aWeightedDbfs, rotaryDb: test.rotaryDb, clicksPerMinute: test.clicksPerMinute,
        computedVerdict: test.computedVerdict, finalVerdict: test.finalVerdict, overruleReason: test.overruleReason,
      },
      recorder: recorder ? { name: recorder.name, stylus: recorder.stylus, horn: recorder.horn } : null,
      testCut: testCut ? { aWeightedDbfs: testCut.aWeightedDbfs, clicksPerMinute: testCut.clicksPerMinute, verdict: testCut.verdict } : null,
      cutAt: ticket.cutAt,
      readyAt: ready?.at ?? null,
      stage: ticket.stage,
      thresholds: await testCutThresholds(db),
    },
  }
}

/**
 * A cylinder that arrived broken is made again: one new ticket per broken order item, on the same item
 * with the next unit number, queued and due after the shop's lead time; the order goes back into
 * production (from delivered or shipped), so the replacement passes through dispatch like any cut.
 */
export async function openReplacementTickets(tx: Db, orderId: number, orderItemIds: number[], note: string, actorUserId: number) {
  const items = await tx.select().from(orderItems).where(eq(orderItems.orderId, orderId))
  const broken = items.filter(item => orderItemIds.includes(item.id))
  const dueDate = ticketDueDate(new Date(), (await getSetting('engine', tx)).production.leadTimeDays)
  const opened: { id: number, orderItemId: number, unit: number }[] = []
  for (const item of broken) {
    const [last] = await tx.select({ unit: sql<number>`coalesce(max(${tickets.unit}), 0)::int` }).from(tickets).where(eq(tickets.orderItemId, item.id))
    const unit = Math.max(Number(last?.unit ?? 0), item.quantity) + 1
    const [ticket] = await tx.insert(tickets).values({ orderId, orderItemId: item.id, unit, format: item.format, dueDate, wishes: ticketWishesFromDetails(item.details) }).returning({ id: tickets.id })
    await logTicketEvent(tx, ticket!.id, null, 'queued', note, actorUserId)
    opened.push({ id: ticket!.id, orderItemId: item.id, unit })
  }
  if (opened.length) await moveOrder(tx, orderId, ['delivered', 'shipped'], 'in_production', {}, note, actorUserId)
  return opened
}
