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
  // In a bucket only the asked range is fetched; from a folder the file is read and sliced.
  const found = await readStoredFilePart(file.id, getRequestHeader(event, 'range'), file.bytes)
  if (!found) throw notFoundError('No such file.')
  if ('unsatisfiable' in found) {
    setResponseHeader(event, 'Content-Range', `bytes */${found.unsatisfiable}`)
    throw createError({ statusCode: 416, statusMessage: 'Range Not Satisfiable', message: 'That part of the file does not exist.' })
  }
  if ('part' in found) {
    setResponseStatus(event, 206)
    setResponseHeader(event, 'Content-Range', `bytes ${found.start}-${found.end}/${found.size}`)
    setResponseHeader(event, 'Content-Length', found.part.byteLength)
    return found.part
  }
  setResponseHeader(event, 'Content-Length', found.whole.byteLength)
  return found.whole
}
