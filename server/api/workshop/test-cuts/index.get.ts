import { desc, eq } from 'drizzle-orm'
import { z } from 'zod'
import { blanks, recorders, testCuts } from '../../../db/schema'

const querySchema = z.object({
  recorderId: idField('recorderId').optional(),
  limit: z.coerce.number({ error: 'limit must be a number' }).int().min(1).max(200, 'limit is at most 200').default(50),
})

/** The latest test cuts, of all recorders or of one. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { recorderId, limit } = queryWith(event, querySchema)
  const db = await useDB()
  const rows = await db.select({
    id: testCuts.id, cutAt: testCuts.cutAt, recorderId: testCuts.recorderId, recorderName: recorders.name, blankCode: blanks.code,
    aWeightedDbfs: testCuts.aWeightedDbfs, clicksPerMinute: testCuts.clicksPerMinute, verdict: testCuts.verdict, notes: testCuts.notes,
  }).from(testCuts)
    .innerJoin(recorders, eq(recorders.id, testCuts.recorderId))
    .leftJoin(blanks, eq(blanks.id, testCuts.blankId))
    .where(recorderId ? eq(testCuts.recorderId, recorderId) : undefined)
    .orderBy(desc(testCuts.cutAt), desc(testCuts.id)).limit(limit)
  return { cuts: rows }
})
