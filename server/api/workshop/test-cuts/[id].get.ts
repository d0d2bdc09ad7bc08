import { eq } from 'drizzle-orm'
import { blanks, recorders, testCuts } from '../../../db/schema'

/** One test cut with the audio engine's full answer and its recording. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const db = await useDB()
  const [row] = await db.select({ cut: testCuts, recorderName: recorders.name, blankCode: blanks.code }).from(testCuts)
    .innerJoin(recorders, eq(recorders.id, testCuts.recorderId))
    .leftJoin(blanks, eq(blanks.id, testCuts.blankId))
    .where(eq(testCuts.id, id))
  if (!row) throw notFoundError('No such test cut.')
  return { ...row.cut, recorderName: row.recorderName, blankCode: row.blankCode, fileUrl: row.cut.fileId ? storedFileUrl(row.cut.fileId) : null }
})
