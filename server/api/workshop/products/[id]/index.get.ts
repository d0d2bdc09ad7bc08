import { and, eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { products } from '../../../../db/schema'

const paramsSchema = z.object({ id: z.coerce.number({ error: 'id must be a number' }).int('id must be a whole number').positive('id must be a positive number') })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, paramsSchema)
  const db = await useDB()
  const [product] = await db.select().from(products).where(and(eq(products.id, id), inArray(products.kind, [...editableProductKinds])))
  if (!product) throw createError({ statusCode: 404, statusMessage: 'Not found', message: 'No such product in the catalogue.' })
  const settings = await getSetting('engine', db)
  return { currency: settings.prices.currency, product }
})
