import { inArray } from 'drizzle-orm'
import { products } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

export interface QuoteChange {
  slug: string
  kind: 'price' | 'stock' | 'unavailable'
  message: string
}

export interface QuoteLine {
  slug: string
  productId: number
  title: string
  kind: ProductRow['kind']
  format: ProductRow['format']
  qty: number
  unitPriceMinor: number
  lineTotalMinor: number
  taxMinor: number
  stock: number
  madeToOrder: boolean
}

/**
 * Prices a cart from the database, never from what the browser sent: every line at today's price
 * and stock, with a list of what changed since the customer saw it.
 */
export async function quoteCart(db: Database | Transaction, input: { items: CartItemInput[], shipTo?: { country?: string | undefined, region?: string | undefined } | undefined }) {
  const settings = await getSetting('engine', db)
  // The zone and the tax follow from where the parcel goes; nothing the browser says about them counts.
  if (input.shipTo?.country && !countryCodeFor(input.shipTo.country)) throw fieldError('shipTo.country', 'country must be one from the list (an ISO 3166-1 code such as US)')
  const place = placeForAddress(input.shipTo ?? {}, settings.prices)
  const { zone, taxRegion } = place

  const rows = await db.select().from(products).where(inArray(products.slug, input.items.map(item => item.slug)))
  const bySlug = new Map(rows.map(row => [row.slug, row]))
  const changes: QuoteChange[] = []
  const kept: { item: CartItemInput, product: ProductRow, qty: number }[] = []
  for (const item of input.items) {
    const product = bySlug.get(item.slug)
    if (!product || product.hidden || product.kind === 'custom') {
      changes.push({ slug: item.slug, kind: 'unavailable', message: `${product?.title ?? item.slug} is no longer offered and was taken out of the cart.` })
      continue
    }
    let qty = item.qty
    if (product.stock < qty) {
      changes.push({ slug: item.slug, kind: 'stock', message: product.stock === 0 ? `${product.title} is sold out.` : `Only ${product.stock} of ${product.title} left; the quantity was lowered.` })
      qty = product.stock
    }
    if (item.seenUnitPriceMinor !== undefined && item.seenUnitPriceMinor !== product.priceMinor) {
      changes.push({ slug: item.slug, kind: 'price', message: `${product.title} now costs ${formatMoney(product.priceMinor, settings.prices.currency)} (was ${formatMoney(item.seenUnitPriceMinor, settings.prices.currency)}).` })
    }
    if (qty > 0) kept.push({ item, product, qty })
  }

  const priced = kept.length > 0
    ? priceCart({
        lines: kept.map(({ product, qty }) => ({ kind: 'recorded' as const, title: product.title, unitPriceMinor: product.priceMinor, quantity: qty })),
        shippingZoneId: zone,
        taxRegionId: taxRegion,
      }, settings)
    : null
  const lines: QuoteLine[] = kept.map(({ product, qty }, index) => ({
    slug: product.slug,
    productId: product.id,
    title: product.title,
    kind: product.kind,
    format: product.format,
    qty,
    unitPriceMinor: product.priceMinor,
    lineTotalMinor: priced!.lines[index]!.lineTotalMinor,
    taxMinor: priced!.lines[index]!.taxMinor,
    stock: product.stock,
    madeToOrder: product.madeToOrder,
  }))
  return {
    currency: settings.prices.currency,
    zone,
    taxRegion,
    // What the cart page shows: "Ships as Domestic; Home state sales tax 8.25 %".
    place,
    lines,
    changes,
    subtotalMinor: priced?.subtotalMinor ?? 0,
    shippingMinor: priced?.shippingMinor ?? 0,
    taxMinor: priced?.taxMinor ?? 0,
    totalMinor: priced?.totalMinor ?? 0,
    zones: settings.prices.shippingZones.map(z => ({ id: z.id, label: z.label })),
    taxRegions: settings.prices.taxRegions.map(r => ({ id: r.id, label: r.label })),
  }
}
