import type { H3Event } from 'h3'
import type { StoredFileRow } from '#shared/types/rows'

/**
 * Sends a stored file once the caller has decided who may have it: its type, an inline name, a sandboxed
 * CSP, an ETag (bytes under an id never change) and one byte range per request, so audio is seekable.
 * `shared` marks a file any visitor may have (a cache may keep it, asking again before each use); every
 * other file stays out of shared caches. Used by `/files/<id>` and by the routes that serve a customer's
 * own files (proofs, claim photos) after their own permission check.
 */
export async function sendStoredFile(event: H3Event, file: StoredFileRow, options: { shared?: boolean } = {}) {
  const data = await readStoredFile(file.id)
  if (!data) throw notFoundError('No such file.')
  setResponseHeaders(event, {
    'Content-Type': file.mime,
    'Content-Disposition': inlineDisposition(file.originalName),
    'X-Content-Type-Options': 'nosniff',
    'Content-Security-Policy': 'default-src \'none\'; img-src \'self\'; media-src \'self\'; style-src \'unsafe-inline\'; sandbox',
    'Cache-Control': options.shared ? 'public, no-cache' : 'private, no-cache',
    'ETag': `"${file.id}"`,
    'Accept-Ranges': 'bytes',
  })
  if (getRequestHeader(event, 'if-none-match') === `"${file.id}"`) {
    setResponseStatus(event, 304)
    return null
  }
  const range = parseByteRange(getRequestHeader(event, 'range'), data.byteLength)
  if (range === 'unsatisfiable') {
    setResponseHeader(event, 'Content-Range', `bytes */${data.byteLength}`)
    throw createError({ statusCode: 416, statusMessage: 'Range Not Satisfiable', message: 'That part of the file does not exist.' })
  }
  if (range) {
    setResponseStatus(event, 206)
    setResponseHeader(event, 'Content-Range', `bytes ${range.start}-${range.end}/${data.byteLength}`)
    setResponseHeader(event, 'Content-Length', range.end - range.start + 1)
    return data.subarray(range.start, range.end + 1)
  }
  setResponseHeader(event, 'Content-Length', data.byteLength)
  return data
}
