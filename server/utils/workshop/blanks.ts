import { and, asc, count, desc, eq, ilike, inArray, ne, sql, type SQL } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { blankCodeCounters, blankLog, blanks, orderItemBlanks, orders, surfaceTests, tickets, waxBatches } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type BlankLogKind = typeof blankLog.$inferInsert['kind']

/**
 * Draws `n` consecutive codes for this year inside the caller's transaction. The upsert takes the
 * year's counter row under a row lock until the transaction ends, so concurrent creations queue
 * behind each other; a rolled-back creation rolls its numbers back too: no gaps, no repeats.
 */
export async function drawBlankCodes(tx: Transaction, n: number, at: Date = new Date()): Promise<string[]> {
  const year = at.getUTCFullYear()
  const [row] = await tx.insert(blankCodeCounters).values({ year, last: n })
    .onConflictDoUpdate({ target: blankCodeCounters.year, set: { last: sql`${blankCodeCounters.last} + ${n}` } })
    .returning({ last: blankCodeCounters.last })
  const first = row!.last - n + 1
  return Array.from({ length: n }, (_, i) => formatBlankCode(year, first + i))
}

/** The blank's code from the route, checked. */
export function blankCodeParam(event: H3Event): string {
  return paramsWith(event, blankCodeParamsSchema).code
}

function noSuchBlank(code: string, field?: string) {
  if (!field) return createError({ statusCode: 404, statusMessage: 'Not found', message: `No blank has the code ${code}.` })
  return createError({ statusCode: 404, statusMessage: 'Not found', message: `${field}: no blank in the register has the code ${code}.`, data: { fields: { [field]: 'no such blank' } } })
}

/**
 * The one lookup of a blank by its code; a 404 when there is none (naming `field` when the code came from
 * a form field rather than the address). With `lock` (inside a transaction) the row stays locked to its
 * end, so two changes to the blank queue rather than interleave.
 */
export async function findBlankByCode(db: Database | Transaction, code: string, options: { lock?: boolean, field?: string } = {}): Promise<BlankRow> {
  const query = db.select().from(blanks).where(eq(blanks.code, code))
  const [blank] = options.lock ? await query.for('update').limit(1) : await query.limit(1)
  if (!blank) throw noSuchBlank(code, options.field)
  return blank
}

/** The blank, locked for the rest of the transaction so two changes to it queue rather than interleave. */
export async function lockBlankByCode(tx: Transaction, code: string): Promise<BlankRow> {
  return await findBlankByCode(tx, code, { lock: true })
}

/** The one query for "which open ticket (any stage but done, other than `exceptTicketId`) holds this blank". */
export async function blankHolderOf(db: Database | Transaction, blankId: number, exceptTicketId?: number): Promise<BlankHolder | null> {
  const [holder] = await db.select({ ticketId: tickets.id, orderNumber: orders.number })
    .from(tickets).innerJoin(orders, eq(orders.id, tickets.orderId))
    .where(and(eq(tickets.blankId, blankId), ne(tickets.stage, 'done'), exceptTicketId ? ne(tickets.id, exceptTicketId) : undefined)).limit(1)
  return holder ?? null
}

/**
 * The statuses of an order whose tied blanks are no longer held for a parcel: gone with it (shipped,
 * delivered) or never to go (cancelled, refunded), so the maker may deal with the blank again.
 */
const blankReleasingStatuses = ['shipped', 'delivered', 'cancelled', 'refunded'] as const

/**
 * The order a blank was tied to at packing (`order_item_blanks`), while that order is still to ship:
 * the blank is the parcel's, so nothing but shipping may move it. Null when no such order holds it.
 */
export async function blankOrderTieOf(db: Database | Transaction, blankId: number): Promise<{ orderNumber: string } | null> {
  const [tie] = await db.select({ orderNumber: orders.number }).from(orderItemBlanks).innerJoin(orders, eq(orders.id, orderItemBlanks.orderId))
    .where(and(eq(orderItemBlanks.blankId, blankId), sql`${orders.status} not in (${sql.join(blankReleasingStatuses.map(status => sql`${status}`), sql`, `)})`)).limit(1)
  return tie ?? null
}

function tiedToOrderError(blank: BlankRow, orderNumber: string, action: string) {
  return createError({
    statusCode: 409,
    statusMessage: 'Conflict',
    message: `${blank.code}: this blank is packed for order ${orderNumber}, which has not shipped; it cannot be ${action} while the parcel holds it.`,
    data: { state: blank.state, orderNumber },
  })
}

/** 409 with the life-cycle table's sentence when `action` is not allowed for the blank now. */
export async function assertBlankAction(db: Database | Transaction, blank: BlankRow, action: BlankAction): Promise<void> {
  const holder = blankTransitions[action].unheldOnly ? await blankHolderOf(db, blank.id) : null
  const refusal = blankActionRefusal(action, blank.state, holder)
  if (refusal) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `${blank.code}: ${refusal}`, data: { state: blank.state, action } })
  if (action !== 'ship') {
    const tie = await blankOrderTieOf(db, blank.id)
    if (tie) throw tiedToOrderError(blank, tie.orderNumber, action === 'scrap' ? 'scrapped' : 'worked on')
  }
}

export async function writeBlankLog(tx: Transaction, blankId: number, kind: BlankLogKind, data: object, byUserId: number | null, at?: Date) {
  const [entry] = await tx.insert(blankLog).values({ blankId, kind, data: data as Record<string, unknown>, byUserId, ...(at ? { at } : {}) }).returning()
  return entry!
}

type BlankStateValue = BlankRow['state']

export interface BlankMove {
  from: BlankStateValue
  to: BlankStateValue
  reason: string
  byUserId: number | null
  /** Kept in the log row beside from, to and reason (the ticket or test cut that moved it). */
  details?: { ticketId?: number, testCutId?: number }
  /** Back-dates the move and its log row (the demo seed). */
  at?: Date
  /** Where the blank goes; the usual place of the new state when left out (`blankUsualPlaces`). */
  location?: string
}

/**
 * A blank's move from one state to another on behalf of a ticket, a test cut or dispatch, logged with its
 * reason. Conditional: it happens only while the blank is still in `from`, so two requests cannot both
 * move it. The blank goes to the move's location, else the usual place of its new state, and the stock of
 * blank products counted from the register follows in the same transaction. Returns the moved row, or
 * null when the blank had already left `from`. A reserved blank packed for an order still to ship moves
 * only to shipped (409 naming the order otherwise). Moves that the maker makes on the blank itself go
 * through changeBlank; no other code writes a blank's state.
 */
export async function moveBlank(tx: Database | Transaction, blankId: number, move: BlankMove): Promise<BlankRow | null> {
  if (move.from === 'reserved' && move.to !== 'shipped') {
    const tie = await blankOrderTieOf(tx, blankId)
    if (tie) {
      const [blank] = await tx.select().from(blanks).where(eq(blanks.id, blankId)).limit(1)
      throw tiedToOrderError(blank!, tie.orderNumber, `moved to ${move.to.replace('_', ' ')}`)
    }
  }
  const at = move.at ?? new Date()
  const location = move.location ?? blankUsualPlaces[move.to]
  const [moved] = await tx.update(blanks).set({ state: move.to, location, updatedAt: at })
    .where(and(eq(blanks.id, blankId), eq(blanks.state, move.from))).returning()
  if (!moved) return null
  const data = { from: move.from, to: move.to, reason: move.reason, ...move.details } satisfies BlankStateLogData
  await tx.insert(blankLog).values({ blankId, kind: 'state', data, byUserId: move.byUserId, at })
  await refreshBlankStock(tx)
  return moved
}

type BlankChanges = Partial<Pick<BlankRow, 'state' | 'diameterIn' | 'surfacesUsed' | 'location' | 'notes'>>

/**
 * Applies the changes; a move to another state is logged with its reason and takes the blank to the usual
 * place of its new state unless the changes name a location (a location the maker typed stays until the
 * next change of state). Any change naming a state (a test stored, even one that keeps the state) counts
 * the register's blank stock again. `at` back-dates the change and its log (the demo seed). A blank tied
 * to an order at packing is refused any change of state (409 naming the order) until the order ships.
 */
export async function changeBlank(tx: Transaction, blank: BlankRow, changes: BlankChanges, reason: string, byUserId: number | null, at?: Date): Promise<BlankRow> {
  // A blank packed for an unshipped order leaves its state only by shipping (moveBlank, from dispatch).
  if (changes.state && changes.state !== blank.state) {
    const tie = await blankOrderTieOf(tx, blank.id)
    if (tie) throw tiedToOrderError(blank, tie.orderNumber, `moved to ${changes.state.replace('_', ' ')}`)
  }
  const location = blankLocationAfter(blank, changes)
  const [updated] = await tx.update(blanks).set({ ...changes, location, updatedAt: at ?? new Date() }).where(eq(blanks.id, blank.id)).returning()
  if (changes.state && changes.state !== blank.state) {
    await writeBlankLog(tx, blank.id, 'state', { from: blank.state, to: changes.state, reason } satisfies BlankStateLogData, byUserId, at)
  }
  if (changes.state || changes.surfacesUsed !== undefined) await refreshBlankStock(tx)
  return updated!
}

/**
 * Ties one free passed blank of the pool (format and wax) to each unit of an order's blank item not yet
 * tied, quietest first, reserving it for the parcel (at the packing table). Returns the codes tied, or
 * the number of units the register could not cover (nothing is tied then: the caller refuses the packing
 * and its transaction rolls back).
 */
export async function reserveBlanksForItem(tx: Transaction, item: { orderId: number, orderItemId: number, units: number[], format: BlankRow['format'], waxFormulaId: string, orderNumber: string }, byUserId: number): Promise<{ codes: string[] } | { missing: number }> {
  // A blank tied to another order is reserved or shipped already, so the picker's rule leaves it out.
  const free = await eligibleBlanks(tx, item.format, { waxFormulaId: item.waxFormulaId, limit: item.units.length })
  if (free.length < item.units.length) return { missing: item.units.length - free.length }
  const codes: string[] = []
  for (const [index, unit] of item.units.entries()) {
    const blank = free[index]!
    await tx.insert(orderItemBlanks).values({ orderId: item.orderId, orderItemId: item.orderItemId, unit, blankId: blank.id, tiedBy: byUserId })
    const moved = await moveBlank(tx, blank.id, { from: 'tested_pass', to: 'reserved', reason: `Reserved for order ${item.orderNumber} at packing.`, byUserId, location: blankPackingPlace })
    if (!moved) throw conflictError(`Blank ${blank.code} changed meanwhile; press Pack again.`)
    codes.push(blank.code)
  }
  return { codes }
}

/** The blanks packed into an order leave with it: reserved → shipped. Returns how many moved. */
export async function shipOrderBlanks(tx: Transaction, orderId: number, orderNumber: string, byUserId: number): Promise<number> {
  const rows = await tx.select({ blankId: orderItemBlanks.blankId }).from(orderItemBlanks).where(eq(orderItemBlanks.orderId, orderId))
  let shipped = 0
  for (const row of rows) {
    if (await moveBlank(tx, row.blankId, { from: 'reserved', to: 'shipped', reason: `Shipped with order ${orderNumber}.`, byUserId })) shipped++
  }
  return shipped
}

/** A reaming session as the log keeps it, with the engine's plan from the reading before. */
export function blankReamingRecord(input: Omit<BlankReamingLogData, 'plan'>, settings: EngineSettings): BlankReamingLogData {
  const planned = reamingPlan({ overhangIn: input.overhangBeforeIn, benchTemperatureF: input.roomTemperatureF }, settings)
  const afterwards = reamingPlan({ overhangIn: input.overhangAfterIn }, settings)
  const warnings = [...planned.warnings]
  if (afterwards.status === 'past_fit') warnings.push(afterwards.warnings[0]!)
  if (planned.status === 'plan' && input.reamings > planned.reamings) warnings.push(`${input.reamings} reamings were done where the plan asked for ${planned.reamings}.`)
  return {
    ...input,
    plan: {
      status: planned.status,
      reamingsToFit: planned.reamings,
      sets: planned.sets,
      targetIn: planned.targetIn,
      expectedAfterIn: input.overhangBeforeIn + input.reamings * planned.perReamingIn,
      remainingAfter: afterwards.reamings,
      warnings,
    },
  }
}

/**
 * A shaving session as the log keeps it, with the engine's plan from the diameter before: the depth
 * to clean up from the smallest diameter read, or one fresh surface's depth when none was read.
 */
export function blankShavingRecord(input: Omit<BlankShavingLogData, 'plan'>, settings: EngineSettings): BlankShavingLogData {
  const { minimumDiameterIn, depthPerSurfaceIn } = settings.shaving
  const plan = shavingPlan({
    highDiameterIn: input.diameterBeforeIn,
    lowDiameterIn: input.lowDiameterIn ?? undefined,
    depthToCleanUpIn: input.lowDiameterIn === null ? depthPerSurfaceIn : undefined,
    wheelDegrees: input.wheelDegrees,
  }, settings)
  const warnings = [...plan.warnings]
  if (input.diameterAfterIn < minimumDiameterIn - 1e-9) {
    warnings.push(`${formatInches(input.diameterAfterIn)} in is under the shop's minimum diameter of ${formatInches(minimumDiameterIn)} in: this blank should be scrapped.`)
  }
  return {
    ...input,
    plan: {
      infeedIn: plan.infeedIn,
      depthToCleanUpIn: plan.depthToCleanUpIn,
      passesToCleanUp: plan.passes,
      expectedAfterIn: input.diameterBeforeIn - 2 * input.passes * plan.infeedIn,
      surfacesLeft: blankSurfacesLeft(input.diameterAfterIn, minimumDiameterIn, depthPerSurfaceIn).surfacesLeft ?? 0,
      warnings,
    },
  }
}

const registerOrderings: Record<BlankRegisterSort, SQL[]> = {
  code_asc: [asc(blanks.code)],
  code_desc: [desc(blanks.code)],
  updated_desc: [desc(blanks.updatedAt), desc(blanks.code)],
  updated_asc: [asc(blanks.updatedAt), asc(blanks.code)],
  diameter_desc: [sql`${blanks.diameterIn} desc nulls last`, asc(blanks.code)],
  diameter_asc: [sql`${blanks.diameterIn} asc nulls last`, asc(blanks.code)],
  surfaces_desc: [desc(blanks.surfacesUsed), asc(blanks.code)],
}

/**
 * The register's table: filter by state, format and batch, search by code, sort, page. The latest
 * test of each listed blank's current surface comes in a second query over the page's rows only.
 */
export async function listBlankRegister(db: Database, query: BlankRegisterQuery, settings: EngineSettings, limit?: number) {
  const filters: SQL[] = []
  if (query.state) filters.push(eq(blanks.state, query.state))
  if (query.format) filters.push(eq(blanks.format, query.format))
  if (query.batch) filters.push(eq(waxBatches.code, query.batch))
  if (query.q) filters.push(ilike(blanks.code, containsPattern(query.q)))
  const where = filters.length ? and(...filters) : undefined
  const pageSize = limit ?? query.pageSize

  const rows = await db.select({
    id: blanks.id,
    code: blanks.code,
    format: blanks.format,
    state: blanks.state,
    diameterIn: blanks.diameterIn,
    surfacesUsed: blanks.surfacesUsed,
    location: blanks.location,
    updatedAt: blanks.updatedAt,
    batchCode: waxBatches.code,
  }).from(blanks).innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId))
    .where(where).orderBy(...registerOrderings[query.sort])
    .limit(pageSize).offset(limit ? 0 : (query.page - 1) * pageSize)
  const [total] = await db.select({ n: count() }).from(blanks).innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId)).where(where)

  const latest = new Map<number, { finalVerdict: 'pass' | 'fail' | 'incomplete', aWeightedDbfs: number, testedAt: Date }>()
  if (rows.length > 0) {
    const tests = await db.selectDistinctOn([surfaceTests.blankId], { blankId: surfaceTests.blankId, finalVerdict: surfaceTests.finalVerdict, aWeightedDbfs: surfaceTests.aWeightedDbfs, testedAt: surfaceTests.testedAt })
      .from(surfaceTests).innerJoin(blanks, eq(blanks.id, surfaceTests.blankId))
      .where(and(inArray(surfaceTests.blankId, rows.map(row => row.id)), eq(surfaceTests.surface, sql`${blanks.surfacesUsed} + 1`)))
      .orderBy(surfaceTests.blankId, desc(surfaceTests.testedAt), desc(surfaceTests.id))
    for (const test of tests) latest.set(test.blankId, test)
  }

  const { minimumDiameterIn, depthPerSurfaceIn } = settings.shaving
  const { passMaxAgeDays } = await getSetting('surface', db)
  return {
    total: total?.n ?? 0,
    page: query.page,
    pageSize,
    rows: rows.map(({ id, ...row }) => ({
      ...row,
      surfacesLeft: blankSurfacesLeft(row.diameterIn, minimumDiameterIn, depthPerSurfaceIn).surfacesLeft,
      latestTest: latest.get(id) ?? null,
      // A pass older than the shop's passMaxAgeDays: shown as stale, to be tested again.
      staleTest: latest.get(id)?.finalVerdict === 'pass' && surfacePassIsStale(latest.get(id)!.testedAt, passMaxAgeDays),
    })),
  }
}
