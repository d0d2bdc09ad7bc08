import { and, eq } from 'drizzle-orm'
import { z } from 'zod'
import { products } from '../../../db/schema'

const paramsSchema = z.object({ slug: z.string().trim().min(1, 'slug is required').max(120, 'slug is too long') })

export default defineEventHandler(async (event) => {
  const { slug } = paramsWith(event, paramsSchema)
  // The same for everyone: kept until a product or a setting changes (catalogueCache.ts); a miss is kept too.
  const shown = await cachedCatalogueAnswer(`product:${slug}`, async (db) => {
    const [product] = await db.select().from(products).where(and(eq(products.slug, slug), eq(products.hidden, false)))
    if (!product || product.kind === 'custom') return null
    const settings = await getSetting('engine', db)
    return publicProduct(product, settings.prices.currency, settings)
  })
  if (!shown) throw notFoundError('No such cylinder in the shop.')
  return shown
})
