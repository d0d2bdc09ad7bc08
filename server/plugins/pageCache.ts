import type { KeptPage } from '../middleware/page-cache'

// Keeps a public page the renderer made for a cookie-less visitor (server/middleware/page-cache.ts serves it).
const notKept = new Set(['content-encoding', 'content-length', 'vary', 'set-cookie', 'date', 'etag', 'last-modified'])

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('render:response', (response, { event }) => {
    if (!event.context.pageCache || (response.statusCode ?? 200) !== 200 || typeof response.body !== 'string') return
    event.context.pageCache.html = response.body
  })
  nitroApp.hooks.hook('afterResponse', (event) => {
    const page = event.context.pageCache as { key: string, fingerprint: string, html?: string } | undefined
    const nonce = event.context.security?.nonce
    if (!page?.html || typeof nonce !== 'string' || nonce.length < 16) return
    const res = event.node.res
    if (res.statusCode !== 200 || res.getHeader('set-cookie')) return
    const headers: Record<string, string> = {}
    for (const [name, value] of Object.entries(res.getHeaders())) {
      if (value !== undefined && !notKept.has(name)) headers[name] = Array.isArray(value) ? value.join(', ') : String(value)
    }
    keepAnswer<KeptPage>(page.key, page.fingerprint, { html: page.html, headers, nonce })
  })
})
