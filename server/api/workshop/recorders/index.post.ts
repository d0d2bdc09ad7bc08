import { recorders } from '../../../db/schema'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const input = await readBodyWith(event, recorderFieldsSchema)
  const db = await useDB()
  try {
    const [created] = await db.insert(recorders).values(input).returning()
    setResponseStatus(event, 201)
    return created!
  }
  catch (error) {
    if (isRecorderNameTaken(error)) throw recorderNameTaken(input.name)
    throw error
  }
})

function recorderNameTaken(name: string) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', message: `name: another recorder is already called “${name}”.`, data: { fields: { name: 'already used by another recorder' } } })
}
