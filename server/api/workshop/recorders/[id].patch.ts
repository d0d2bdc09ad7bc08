import { eq } from 'drizzle-orm'
import { recorders } from '../../../db/schema'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const input = await readBodyWith(event, recorderPatchSchema)
  const db = await useDB()
  try {
    const [updated] = Object.keys(input).length
      ? await db.update(recorders).set(input).where(eq(recorders.id, id)).returning()
      : await db.select().from(recorders).where(eq(recorders.id, id))
    if (!updated) throw notFoundError('No such recorder.')
    return updated
  }
  catch (error) {
    if (isRecorderNameTaken(error)) {
      throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `name: another recorder is already called “${input.name}”.`, data: { fields: { name: 'already used by another recorder' } } })
    }
    throw error
  }
})
