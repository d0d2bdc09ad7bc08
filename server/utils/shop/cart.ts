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
export async function quoteCart(db: Database | Transaction, input: { items: CartItemInput[], zone?: string, taxRegion?: string }) {
  const settings = await getSetting('engine', db)
  const zone = input.zone ?? settings.prices.shippingZones[0]!.id
  const taxRegion = input.taxRegion ?? settings.prices.taxRegions[0]!.id
  if (!settings.prices.shippingZones.some(z => z.id === zone)) throw fieldError('zone', `unknown shipping zone "${zone}"`)
  if (!settings.prices.taxRegions.some(r => r.id === taxRegion)) throw fieldError('taxRegion', `unknown tax region "${taxRegion}"`)

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
