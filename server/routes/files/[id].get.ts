import { eq } from 'drizzle-orm'
import { files } from '../../db/schema'

const notFound = () => createError({ statusCode: 404, statusMessage: 'Not found', message: 'No such file.' })

/**
 * A stored file by its id. Public files (a product's photos and sample) go to anyone; the rest only
 * to makers, and to everyone else the file does not exist. Audio is seekable: one byte range per request.
 */
export default defineEventHandler(async (event) => {
  const id = getRouterParam(event, 'id') ?? ''
  if (!fileIdPattern.test(id)) throw notFound()
  const db = await useDB()
  const [file] = await db.select().from(files).where(eq(files.id, id))
  if (!file) throw notFound()
  if (!file.isPublic && (await currentUser(event))?.role !== 'maker') throw notFound()

  const data = await readStoredFile(id)
  if (!data) throw notFound()
  setResponseHeaders(event, {
    'Content-Type': file.mime,
    'Content-Disposition': inlineDisposition(file.originalName),
    'X-Content-Type-Options': 'nosniff',
    'Content-Security-Policy': 'default-src \'none\'; img-src \'self\'; media-src \'self\'; style-src \'unsafe-inline\'; sandbox',
    // Bytes under an id never change; a private file is checked again on every use.
    'Cache-Control': file.isPublic ? 'public, max-age=31536000, immutable' : 'private, no-cache',
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
})
