import { z } from 'zod'

export const catalogueQuerySchema = z.object({
  kind: z.enum(['blank', 'recorded'], { error: 'kind must be blank or recorded' }).optional(),
  format: z.enum(['two_minute', 'four_minute'], { error: 'format must be two_minute or four_minute' }).optional(),
  q: z.string().trim().max(100, 'q is too long').optional(),
  sort: z.enum(['title', 'price_asc', 'price_desc', 'newest'], { error: 'sort must be title, price_asc, price_desc or newest' }).default('title'),
  page: z.coerce.number({ error: 'page must be a number' }).int('page must be a whole number').min(1, 'page must be at least 1').max(1000, 'page is too large').default(1),
})

export type CatalogueQuery = z.infer<typeof catalogueQuerySchema>

export const cataloguePageSize = 12
