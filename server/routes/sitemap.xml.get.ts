import { eq } from 'drizzle-orm'
import escapeXml from 'escape-html'
import { products } from '../db/schema'

export default defineEventHandler(async (event) => {
  const site = String(useRuntimeConfig(event).siteUrl).replace(/\/$/, '')
  const db = await useDB()
  const rows = await db.select({ slug: products.slug, kind: products.kind, updatedAt: products.updatedAt }).from(products).where(eq(products.hidden, false))
  const guides = await listGuides()
  const pages = ['/', '/cylinders', '/cylinders?kind=blank', '/cylinders?kind=recorded', '/custom', '/guides', ...guides.map(guide => `/guides/${guide.slug}`)]
  const urls = [
    ...pages.map(path => `<url><loc>${escapeXml(site + path)}</loc></url>`),
    ...rows.filter(row => row.kind !== 'custom').map(row => `<url><loc>${escapeXml(`${site}/cylinders/${row.slug}`)}</loc><lastmod>${row.updatedAt.toISOString()}</lastmod></url>`),
  ]
  setResponseHeader(event, 'content-type', 'application/xml; charset=utf-8')
  return `<?xml version="1.0" encoding="UTF-8"?>\n<urlset xmlns="http://www.sitemaps.org/schemas/sitemap/0.9">\n${urls.join('\n')}\n</urlset>\n`
})
