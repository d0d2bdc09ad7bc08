import { and, eq } from 'drizzle-orm'
import { z } from 'zod'
import { products } from '../../../db/schema'

const paramsSchema = z.object({ slug: z.string().trim().min(1, 'slug is required').max(120, 'slug is too long') })

export default defineEventHandler(async (event) => {
  const { slug } = paramsWith(event, paramsSchema)
  const db = await useDB()
  const [product] = await db.select().from(products).where(and(eq(products.slug, slug), eq(products.hidden, false)))
  if (!product || product.kind === 'custom') throw notFoundError('No such cylinder in the shop.')
  const settings = await getSetting('engine', db)
  return publicProduct(product, settings.prices.currency)
})
