import { z } from 'zod'

const paramsSchema = z.object({ slug: z.string().trim().toLowerCase().min(1, 'slug is required').max(80, 'slug is too long') })

/** GET /api/guides/<slug> (anyone): one guide, its Markdown parsed into the tree the page renders. */
export default defineEventHandler(async (event) => {
  const { slug } = paramsWith(event, paramsSchema)
  const guide = await readGuide(slug)
  if (!guide) throw notFoundError('No such guide.')
  return guide
})
