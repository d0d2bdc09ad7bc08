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

/** What the shop tells a collector about availability: plain words, never a made-up scarcity. */
export function stockLabel(product: { stock: number, madeToOrder: boolean }): { label: string, tone: 'ok' | 'warn' | 'bad' } {
  if (product.madeToOrder) return { label: product.stock > 0 ? `Cut to order · ${product.stock} can be ordered` : 'Cut to order · not taking orders now', tone: product.stock > 0 ? 'ok' : 'bad' }
  if (product.stock <= 0) return { label: 'Sold out', tone: 'bad' }
  if (product.stock <= 3) return { label: `Only ${product.stock} left`, tone: 'warn' }
  return { label: `In stock (${product.stock})`, tone: 'ok' }
}

export const playbackNotes = {
  two_minute: '2-minute cylinders have 100 grooves per inch: play them with a 2-minute reproducer and stylus (a larger tip than for 4-minute records).',
  four_minute: '4-minute cylinders have 200 grooves per inch: they need a 4-minute reproducer or a machine geared for the finer pitch; a 2-minute stylus will damage them.',
} as const
