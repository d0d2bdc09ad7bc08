import { and, asc, count, desc, eq, ilike, or, type SQL } from 'drizzle-orm'
import { products } from '../../db/schema'
import type { Database } from '../platform/db'
import type { EngineSettings } from '#shared/utils/engineSettings'

export function fileUrl(id: string | null | undefined): string | null {
  return id ? `/files/${id}` : null
}

const inchesAndMillimetres = (inches: number, places = 3) => `${Number(inches.toFixed(places))} in · ${inchesToMillimetres(inches).toFixed(1)} mm`

/**
 * What a buyer of a plain blank needs to know: the standard blank's length and outside diameter, its bore
 * and fit (the shop's bore, tapered to the standard mandrel), its wax by the shop's name, how many fresh
 * surfaces shaving can give before the shop's floor diameter, and whether each blank is surface-tested
 * before it is packed (a blank counted from the register is; a typed count says nothing of it).
 */
export function blankProductFacts(product: Pick<ProductRow, 'waxFormulaId' | 'stockSource'>, engine: EngineSettings) {
  const { outsideDiameterIn, lengthIn } = standardBlankDimensions
  const wax = engine.fit.waxFormulas.find(formula => formula.id === product.waxFormulaId) ?? engine.fit.waxFormulas[0]!
  const { minimumDiameterIn, depthPerSurfaceIn } = engine.shaving
  return {
    length: `${formatInchFraction(lengthIn)} in · ${inchesToMillimetres(lengthIn).toFixed(1)} mm`,
    outsideDiameter: inchesAndMillimetres(outsideDiameterIn),
    bore: inchesAndMillimetres(engine.fit.boreDiameterIn),
    fit: 'Standard taper: reamed to seat on a standard phonograph mandrel',
    wax: wax.label,
    surfaces: blankSurfacesLeft(outsideDiameterIn, minimumDiameterIn, depthPerSurfaceIn).surfacesLeft ?? 0,
    tested: product.stockSource === 'register',
    // The same sizes as figures (inches), for the page to show in the shop's length unit.
    lengthIn,
    outsideDiameterIn,
    boreIn: engine.fit.boreDiameterIn,
  }
}

/** The public face of a product: nothing the maker keeps to themselves. With the shop's figures, a blank's facts too. */
export function publicProduct(product: ProductRow, currency: string, engine?: EngineSettings) {
  return {
    blank: product.kind === 'blank' && engine ? blankProductFacts(product, engine) : null,
    slug: product.slug,
    kind: product.kind,
    title: product.title,
    performer: product.performer,
    description: product.description,
    format: product.format,
    rpm: product.rpm,
    material: product.material,
    condition: product.condition,
    runningTimeS: product.runningTimeS,
    priceMinor: product.priceMinor,
    currency,
    stock: product.stock,
    madeToOrder: product.madeToOrder,
    editionSize: product.editionSize,
    photoUrls: product.photoFileIds.map(id => fileUrl(id)!),
    photoAlt: product.photoAlt || `${product.title}, a ${product.format === 'two_minute' ? '2-minute' : '4-minute'} cylinder`,
    sampleUrl: fileUrl(product.sampleFileId),
    updatedAt: product.updatedAt,
  }
}

const sortings = {
  title: [asc(products.title)],
  price_asc: [asc(products.priceMinor), asc(products.title)],
  price_desc: [desc(products.priceMinor), asc(products.title)],
  newest: [desc(products.createdAt), asc(products.title)],
}

export async function searchCatalogue(db: Database, query: CatalogueQuery) {
  const filters: SQL[] = [eq(products.hidden, false), or(eq(products.kind, 'blank'), eq(products.kind, 'recorded'))!]
  if (query.kind) filters.push(eq(products.kind, query.kind))
  if (query.format) filters.push(eq(products.format, query.format))
  if (query.q) {
    const pattern = containsPattern(query.q)
    filters.push(or(ilike(products.title, pattern), ilike(products.performer, pattern), ilike(products.description, pattern), ilike(products.material, pattern))!)
  }
  const where = and(...filters)
  const rows = await db.select().from(products).where(where).orderBy(...sortings[query.sort])
    .limit(cataloguePageSize).offset((query.page - 1) * cataloguePageSize)
  const [total] = await db.select({ n: count() }).from(products).where(where)
  const settings = await getSetting('engine', db)
  return { items: rows.map(row => publicProduct(row, settings.prices.currency)), total: total?.n ?? 0, page: query.page, pageSize: cataloguePageSize }
}
