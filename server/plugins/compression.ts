import { promisify } from 'node:util'
import { brotliCompress, constants, gzip } from 'node:zlib'
import type { H3Event } from 'h3'

/*
 * Pages and JSON answers go out compressed when the client says it takes brotli or gzip (Accept-Encoding).
 * Build assets are compressed once at build time (nitro.compressPublicAssets) and served as they are.
 * Left alone: error answers, small answers, streams, byte ranges (206 / Content-Range), answers already encoded, and kinds
 * that are compressed already (audio, images but SVG, PDF, archives) or that are not text.
 */
const MIN_BYTES = 1024
const brotli = promisify(brotliCompress)
const gzipAsync = promisify(gzip)
const textType = /^(text\/|application\/(json|javascript|xml|ld\+json|manifest\+json|problem\+json)|image\/svg\+xml)/i

function chooseEncoding(event: H3Event): 'br' | 'gzip' | null {
  const accepted = String(getRequestHeader(event, 'accept-encoding') ?? '').toLowerCase()
  const takes = (name: string) => accepted.split(',').some((entry) => {
    const [token, ...params] = entry.trim().split(';')
    const q = params.map(p => p.trim()).find(p => p.startsWith('q='))
    return token === name && (!q || Number(q.slice(2)) > 0)
  })
  return takes('br') ? 'br' : takes('gzip') ? 'gzip' : null
}

/** The answer as bytes and its type, if it is text we may compress; null to send it as it is. */
function asText(event: H3Event, body: unknown): { bytes: Buffer, type: string } | null {
  const declared = String(getResponseHeader(event, 'content-type') ?? '')
  if (typeof body === 'string') return { bytes: Buffer.from(body), type: declared || 'text/html; charset=utf-8' }
  if (body instanceof Uint8Array) return declared && textType.test(declared) ? { bytes: Buffer.from(body.buffer, body.byteOffset, body.byteLength), type: declared } : null
  if (body === null || typeof body !== 'object' || body instanceof Error) return null
  const proto = Object.getPrototypeOf(body)
  if (!Array.isArray(body) && proto !== Object.prototype && proto !== null) return null
  return { bytes: Buffer.from(JSON.stringify(body)), type: declared || 'application/json' }
}

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('beforeResponse', async (event, response) => {
    // The error page is rendered by an inner request to /__nuxt_error (with the visitor's headers and
    // x-nuxt-error) whose answer the error handler reads back as text: compressing it, or the data it
    // fetches, would send mangled bytes under a Content-Encoding header.
    if (event.method === 'HEAD' || event.node.res.headersSent || event.path.startsWith('/__nuxt_error') || getRequestHeader(event, 'x-nuxt-error')) return
    const status = event.node.res.statusCode
    // Error answers are written by the error handler after this hook, as text: a compressed body would be mangled.
    if (status >= 400 || status === 206 || status === 204 || status === 304 || getResponseHeader(event, 'content-range') || getResponseHeader(event, 'content-encoding')) return
    const encoding = chooseEncoding(event)
    const text = asText(event, response.body)
    if (!text || !textType.test(text.type)) return
    appendResponseHeader(event, 'vary', 'Accept-Encoding')
    if (!encoding || text.bytes.byteLength < MIN_BYTES) return
    const compressed = encoding === 'br'
      ? await brotli(text.bytes, { params: { [constants.BROTLI_PARAM_QUALITY]: 4, [constants.BROTLI_PARAM_SIZE_HINT]: text.bytes.byteLength } })
      : await gzipAsync(text.bytes, { level: 6 })
    setResponseHeader(event, 'content-type', text.type)
    setResponseHeader(event, 'content-encoding', encoding)
    if (getResponseHeader(event, 'content-length')) setResponseHeader(event, 'content-length', compressed.byteLength)
    response.body = compressed
  })
})
