import { desc, eq } from 'drizzle-orm'
import { z } from 'zod'
import { files } from '../../../db/schema'

const querySchema = z.object({
  purpose: z.enum(['photo', 'audio'], { error: 'purpose must be photo or audio' }).optional(),
})

/** Stored files, newest first (at most 500), for the maker to pick from or to check what is kept. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { purpose } = queryWith(event, querySchema)
  const db = await useDB()
  const rows = await db.select().from(files).where(purpose ? eq(files.purpose, purpose) : undefined).orderBy(desc(files.createdAt)).limit(500)
  return rows.map(row => ({ ...row, url: storedFileUrl(row.id) }))
})
