import { and, asc, eq, ilike, inArray, or, type SQL } from 'drizzle-orm'
import { products } from '../../../db/schema'

/** The whole catalogue as the maker sees it: hidden products too, with everything on them. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, productListQuerySchema)
  const filters: SQL[] = [inArray(products.kind, query.kind ? [query.kind] : [...editableProductKinds])]
  if (query.visibility !== 'all') filters.push(eq(products.hidden, query.visibility === 'hidden'))
  if (query.q) {
    const pattern = containsPattern(query.q)
    filters.push(or(ilike(products.title, pattern), ilike(products.performer, pattern), ilike(products.slug, pattern), ilike(products.material, pattern))!)
  }
  const db = await useDB()
  const items = await db.select().from(products).where(and(...filters)).orderBy(asc(products.kind), asc(products.title))
  const settings = await getSetting('engine', db)
  return { currency: settings.prices.currency, items }
})
