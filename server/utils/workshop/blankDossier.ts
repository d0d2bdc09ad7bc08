import { asc, desc, eq } from 'drizzle-orm'
import { blankLog, orders, recorders, surfaceTests, testCuts, tickets, users, waxBatches } from '../../db/schema'
import type { Database } from '../platform/db'

/**
 * One blank with everything the register knows about it: batch, wall left, the reaming and shaving
 * logs (each with the engine's plan as it stood), reshaves, the whole history, its surface tests, the
 * tickets that held or hold it, the test cuts made on it, and the plans for its next step.
 */
export async function blankDossier(db: Database, code: string) {
  const settings = await getSetting('engine', db)
  const { passMaxAgeDays } = await getSetting('surface', db)
  const blank = await findBlankByCode(db, code)
  // Every blank is poured from a batch (a foreign key), so the batch is there.
  const batch = (await db.select().from(waxBatches).where(eq(waxBatches.id, blank.batchId)))[0]!

  const log = await db.select({ entry: blankLog, by: users.name }).from(blankLog)
    .leftJoin(users, eq(users.id, blankLog.byUserId)).where(eq(blankLog.blankId, blank.id)).orderBy(asc(blankLog.at), asc(blankLog.id))
  const tests = await db.select({ test: surfaceTests, by: users.name }).from(surfaceTests)
    .leftJoin(users, eq(users.id, surfaceTests.testedBy)).where(eq(surfaceTests.blankId, blank.id)).orderBy(desc(surfaceTests.testedAt), desc(surfaceTests.id))
  const ticketRows = await db.select({ id: tickets.id, stage: tickets.stage, unit: tickets.unit, dueDate: tickets.dueDate, orderNumber: orders.number, createdAt: tickets.createdAt })
    .from(tickets).innerJoin(orders, eq(orders.id, tickets.orderId)).where(eq(tickets.blankId, blank.id)).orderBy(desc(tickets.createdAt))
  const cuts = await db.select({ id: testCuts.id, cutAt: testCuts.cutAt, recorder: recorders.name, aWeightedDbfs: testCuts.aWeightedDbfs, clicksPerMinute: testCuts.clicksPerMinute, verdict: testCuts.verdict })
    .from(testCuts).innerJoin(recorders, eq(recorders.id, testCuts.recorderId)).where(eq(testCuts.blankId, blank.id)).orderBy(desc(testCuts.cutAt))

  const history = log.map(({ entry, by }) => ({ id: entry.id, kind: entry.kind, at: entry.at, by, data: entry.data }))
  const ofKind = <T>(kind: typeof blankLog.$inferSelect['kind']) => history.filter(e => e.kind === kind)
    .map(({ data, ...e }) => ({ ...e, ...(data as unknown as T) }))
  const reamings = ofKind<BlankReamingLogData>('reaming')
  const shavings = ofKind<BlankShavingLogData>('shaving')
  const reshaves = ofKind<BlankReshaveLogData>('reshave')

  const { minimumDiameterIn, depthPerSurfaceIn } = settings.shaving
  const lastReading = reamings.at(-1)?.overhangAfterIn
  const nextReaming = (blank.state === 'cast' || blank.state === 'reamed') && lastReading !== undefined ? reamingPlan({ overhangIn: lastReading }, settings) : null
  const nextShaving = blank.diameterIn !== null && blank.diameterIn > 0 && !['reserved', 'cut', 'shipped', 'scrapped'].includes(blank.state)
    ? shavingPlan({ highDiameterIn: blank.diameterIn, depthToCleanUpIn: depthPerSurfaceIn }, settings)
    : null

  return {
    blank: {
      code: blank.code,
      format: blank.format,
      state: blank.state,
      diameterIn: blank.diameterIn,
      surfacesUsed: blank.surfacesUsed,
      currentSurface: blankCurrentSurface(blank.surfacesUsed),
      ...blankSurfacesLeft(blank.diameterIn, minimumDiameterIn, depthPerSurfaceIn),
      location: blank.location,
      notes: blank.notes,
      createdAt: blank.createdAt,
      updatedAt: blank.updatedAt,
    },
    batch: { id: batch.id, code: batch.code, formula: batch.formula, pourDate: batch.pourDate },
    shop: { minimumDiameterIn, depthPerSurfaceIn, targetOverhangIn: settings.reaming.targetOverhangIn, referenceTemperatureF: settings.fit.referenceTemperatureF },
    holder: await blankHolderOf(db, blank.id),
    reamings,
    shavings,
    reshaves,
    history,
    surfaceTests: tests.map(({ test, by }) => surfaceTestView(test, by, passMaxAgeDays)),
    tickets: ticketRows,
    testCuts: cuts,
    next: {
      reaming: nextReaming && { status: nextReaming.status, reamings: nextReaming.reamings, sets: nextReaming.sets, targetIn: nextReaming.targetIn, warnings: nextReaming.warnings },
      shaving: nextShaving && { infeedIn: nextShaving.infeedIn, diameterAfterIn: nextShaving.diameterAfterIn, surfacesLeft: nextShaving.surfacesLeft, warnings: nextShaving.warnings },
    },
  }
}
