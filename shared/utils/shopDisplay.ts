// Words and values the public shop pages show, kept free of any validation library: the browser loads this
// file with the catalogue, a cylinder and the cart, so it must not pull in the server's schemas (zod).
import type { CatalogueQuery } from './catalogueQuery'

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

/** The checkout hold in words, for the cart page and the mails ("30 minutes", "2 hours"). */
export function holdText(minutes: number): string {
  if (minutes >= 120 && minutes % 60 === 0) return `${minutes / 60} hours`
  return minutes === 1 ? '1 minute' : `${minutes} minutes`
}

const catalogueKinds = ['blank', 'recorded'] as const
const catalogueFormats = ['two_minute', 'four_minute'] as const
const catalogueSorts = ['title', 'price_asc', 'price_desc', 'newest'] as const

/**
 * The catalogue's filters as the page shows them, read from the address the way `catalogueQuerySchema` reads
 * them on the server (same names, values and defaults): a query the server would refuse shows the unfiltered
 * first page, as before. The server still checks every query it is sent.
 */
export function catalogueQueryFrom(raw: Record<string, unknown>): CatalogueQuery {
  const text = (name: string) => {
    const value = Array.isArray(raw[name]) ? (raw[name] as unknown[])[0] : raw[name]
    return typeof value === 'string' ? value : undefined
  }
  const fallback: CatalogueQuery = { sort: 'title', page: 1 }
  const kind = text('kind')
  const format = text('format')
  const sort = text('sort') ?? 'title'
  const q = text('q')?.trim()
  const pageText = text('page')
  const page = pageText === undefined || pageText.trim() === '' ? (pageText === undefined ? 1 : 0) : Number(pageText)
  if (kind !== undefined && !(catalogueKinds as readonly string[]).includes(kind)) return fallback
  if (format !== undefined && !(catalogueFormats as readonly string[]).includes(format)) return fallback
  if (!(catalogueSorts as readonly string[]).includes(sort)) return fallback
  if (q !== undefined && q.length > 100) return fallback
  if (!Number.isInteger(page) || page < 1 || page > 1000) return fallback
  return {
    ...(kind ? { kind: kind as CatalogueQuery['kind'] } : {}),
    ...(format ? { format: format as CatalogueQuery['format'] } : {}),
    ...(q !== undefined ? { q } : {}),
    sort: sort as CatalogueQuery['sort'],
    page,
  }
}
