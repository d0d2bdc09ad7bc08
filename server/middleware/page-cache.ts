import { randomBytes } from 'node:crypto'
import type { H3Event } from 'h3'

/*
 * The shop's public pages (home, catalogue, a cylinder) as a visitor without a cookie sees them are
 * rendered once and kept while the catalogue's fingerprint stays the same (server/utils/shop/catalogueCache.ts:
 * any product or setting change shows on the next request). A kept page goes out with a fresh CSP nonce in
 * its header and its tags, so no two answers share one. Anyone with a cookie (signed in) gets a fresh render.
 * server/plugins/pageCache.ts keeps what the renderer made.
 */
const publicPage = /^\/(?:cylinders(?:\/[^/?]+)?)?$/

export interface KeptPage {
  html: string
  headers: Record<string, string>
  nonce: string
}

export function pageCacheKey(event: H3Event): string | null {
  if (event.method !== 'GET' || getRequestHeader(event, 'cookie')) return null
  const url = event.node.req.originalUrl ?? event.node.req.url ?? event.path
  if (!publicPage.test(url.split('?')[0]!)) return null
  return `page:${getRequestHeader(event, 'host') ?? ''}${url}`
}

export default defineEventHandler(async (event) => {
  const key = pageCacheKey(event)
  if (!key) return
  const fingerprint = await catalogueFingerprint()
  event.context.pageCache = { key, fingerprint }
  const kept = keptAnswer<KeptPage>(key, fingerprint)
  if (!kept) return
  const nonce = randomBytes(16).toString('base64')
  for (const [name, value] of Object.entries(kept.headers)) setResponseHeader(event, name, value.replaceAll(kept.nonce, nonce))
  return kept.html.replaceAll(kept.nonce, nonce)
})
