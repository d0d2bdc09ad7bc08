/**
 * robots.txt: the shop's public pages (the cart among them) may be indexed; the workshop, dispatch, accounts,
 * orders, certificates and the API may not (behind sign-in, or personal); the sitemap is named by the shop's
 * own address.
 */
const privatePaths = ['/workshop', '/dispatch', '/account', '/orders', '/checkout', '/certificates', '/api/', '/setup', '/reset']

export default defineEventHandler((event) => {
  const site = String(useRuntimeConfig(event).siteUrl).replace(/\/$/, '')
  setResponseHeader(event, 'content-type', 'text/plain; charset=utf-8')
  return ['User-agent: *', ...privatePaths.map(path => `Disallow: ${path}`), '', `Sitemap: ${site}/sitemap.xml`, ''].join('\n')
})
