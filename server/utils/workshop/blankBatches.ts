import { desc, eq, sql } from 'drizzle-orm'
import { blanks, surfaceTests, waxBatches } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

const testedBlank = sql`exists (select 1 from ${surfaceTests} where ${surfaceTests.blankId} = ${blanks.id})`
const passedBlank = sql`exists (select 1 from ${surfaceTests} where ${surfaceTests.blankId} = ${blanks.id} and ${surfaceTests.finalVerdict} = 'pass')`

/**
 * Every batch with its blanks counted. Yield = blanks that passed a surface test ÷ blanks tested
 * (a blank that failed, was reshaved and then passed counts as passed); null until one is tested.
 */
export async function listWaxBatchesWithYield(db: Database) {
  const rows = await db.select({
    batch: waxBatches,
    blanks: sql<number>`count(${blanks.id})::int`,
    tested: sql<number>`(count(${blanks.id}) filter (where ${testedBlank}))::int`,
    passed: sql<number>`(count(${blanks.id}) filter (where ${passedBlank}))::int`,
    ready: sql<number>`(count(${blanks.id}) filter (where ${blanks.state} = 'tested_pass'))::int`,
    scrapped: sql<number>`(count(${blanks.id}) filter (where ${blanks.state} = 'scrapped'))::int`,
  }).from(waxBatches).leftJoin(blanks, eq(blanks.batchId, waxBatches.id))
    .groupBy(waxBatches.id).orderBy(desc(waxBatches.pourDate), desc(waxBatches.id))
  return rows.map(({ batch, ...counts }) => ({
    ...batch,
    ...counts,
    yield: counts.tested > 0 ? counts.passed / counts.tested : null,
  }))
}

/** A 409 that names the field when a batch code is taken (the unique index decides, not a lookup). */
export function isWaxBatchCodeTaken(error: unknown): boolean {
  return isUniqueViolation(error)
}

export function waxBatchCodeTaken(code: string) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', message: `code: the batch code ${code} is taken`, data: { fields: { code: `${code} is taken by another batch` } } })
}

export async function findWaxBatch(db: Database | Transaction, id: number): Promise<WaxBatchRow> {
  const [batch] = await db.select().from(waxBatches).where(eq(waxBatches.id, id)).limit(1)
  if (!batch) throw createError({ statusCode: 404, statusMessage: 'Not found', message: `No wax batch has the id ${id}.` })
  return batch
}

/** A correction sending one of blanks cast and rejected is checked against the other as stored: rejected ≤ cast. */
export function checkCastingCounts(batch: WaxBatchRow, patch: { castCount?: number | null, rejectedAtCasting?: number | null }) {
  const cast = patch.castCount !== undefined ? patch.castCount : batch.castCount
  const rejected = patch.rejectedAtCasting !== undefined ? patch.rejectedAtCasting : batch.rejectedAtCasting
  if (cast != null && rejected != null && rejected > cast) {
    throw fieldError(patch.rejectedAtCasting !== undefined ? 'rejectedAtCasting' : 'castCount', `rejectedAtCasting (${rejected}) cannot be more than castCount (${cast}, the blanks cast)`)
  }
}

/**
 * Corrects a batch with only the fields sent (409 naming `code` when the new code is taken). A change
 * of wax formula moves the batch's blanks to another pool of the register, so the stock of blank
 * products counted from it is counted again in the same transaction: the catalogue shows it at once.
 */
export async function updateWaxBatch(db: Database, id: number, patch: Partial<typeof waxBatches.$inferInsert>): Promise<WaxBatchRow> {
  try {
    return await db.transaction(async (tx) => {
      const [before] = await tx.select({ waxFormulaId: waxBatches.waxFormulaId }).from(waxBatches).where(eq(waxBatches.id, id)).for('update')
      if (!before) throw createError({ statusCode: 404, statusMessage: 'Not found', message: `No wax batch has the id ${id}.` })
      const [batch] = await tx.update(waxBatches).set(patch).where(eq(waxBatches.id, id)).returning()
      if (patch.waxFormulaId !== undefined && patch.waxFormulaId !== before.waxFormulaId) await refreshBlankStock(tx)
      return batch!
    })
  }
  catch (error) {
    if (patch.code && isWaxBatchCodeTaken(error)) throw waxBatchCodeTaken(patch.code)
    throw error
  }
}
