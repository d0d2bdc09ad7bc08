import { and, eq, inArray } from 'drizzle-orm'
import { products } from '../../../../db/schema'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const db = await useDB()
  const [product] = await db.select().from(products).where(and(eq(products.id, id), inArray(products.kind, [...editableProductKinds])))
  if (!product) throw notFoundError('No such product in the catalogue.')
  const settings = await getSetting('engine', db)
  // A blank's stock source, the register's count of its pool and the typed count's difference from it.
  return { currency: settings.prices.currency, product, blankStock: await blankStockView(db, product) }
})
