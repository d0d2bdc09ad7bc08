import type { H3Event } from 'h3'
import sharp from 'sharp'

/*
 * The photos of a breakage claim: several files in one multipart form (field `photos`), each checked the
 * way a catalogue photo is (size, name, type by content) and re-encoded the same way (a fresh WebP, no
 * metadata, at most 2000 px a side) before anything is stored.
 */

const MULTIPART_ALLOWANCE_BYTES = 64 * 1024
const MAX_INPUT_PIXELS = 50_000_000
const PHOTO_MAX_EDGE_PX = 2000

export interface ClaimPhoto {
  data: Buffer
  mime: string
  originalName: string
}

const photoLimit = () => uploadLimits.photo

function claimPhotosTooLarge(field: string, message: string) {
  return createError({ statusCode: 413, statusMessage: 'Payload Too Large', message: `${field}: ${message}; nothing was stored.`, data: { fields: { [field]: message } } })
}

function claimPhotoUnsupported(field: string, message: string) {
  return createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: `${field}: ${message} Nothing was stored.`, data: { fields: { [field]: message } } })
}

/** JPEG, PNG or WebP by the first bytes; the name and the declared type are not trusted. */
function photoKind(bytes: Uint8Array): string | null {
  const starts = (signature: number[], offset = 0) => signature.every((value, i) => bytes[offset + i] === value)
  const ascii = (text: string) => [...text].map(ch => ch.charCodeAt(0))
  if (starts([0xff, 0xd8, 0xff])) return 'JPEG'
  if (starts([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'PNG'
  if (starts(ascii('RIFF')) && starts(ascii('WEBP'), 8)) return 'WebP'
  return null
}

function describeNotPhoto(bytes: Uint8Array): string {
  const head = Buffer.from(bytes.subarray(0, 512)).toString('utf8').trimStart().toLowerCase()
  if (head.startsWith('#!')) return 'a script'
  if (head.includes('<svg')) return 'an SVG drawing'
  if (head.startsWith('<')) return 'HTML or XML text'
  return 'not a JPEG, PNG or WebP picture'
}

/**
 * Reads the form: the text fields (checked for control characters) and 1 to `max` photos in `field`.
 * The declared size is checked before a byte is read: more than `max` × the photo limit → 413.
 */
export async function readClaimPhotoForm(event: H3Event, field: string, max: number): Promise<{ files: { data: Buffer, filename: string }[], fields: Record<string, string> }> {
  const header = getRequestHeader(event, 'content-length')
  if (!header || !/^\d+$/.test(header)) {
    throw createError({ statusCode: 411, statusMessage: 'Length Required', message: `${field}: the upload must state its size (Content-Length); nothing was stored.` })
  }
  if (Number(header) > max * photoLimit().maxBytes + MULTIPART_ALLOWANCE_BYTES) throw claimPhotosTooLarge(field, `at most ${max} photos of ${photoLimit().label} each`)
  if (!/^multipart\/form-data/i.test(getRequestHeader(event, 'content-type') ?? '')) {
    throw fieldError(field, `send the form as multipart/form-data with the photos in a field named "${field}"`)
  }
  const parts = await readMultipartFormData(event) ?? []
  const fields: Record<string, string> = {}
  for (const part of parts) {
    if (part.name && part.filename === undefined) fields[part.name] = part.data.toString('utf8')
  }
  rejectControlCharacters(fields)
  const files = parts.filter(part => part.name === field && part.filename !== undefined).map(part => ({ data: part.data, filename: part.filename ?? '' }))
  if (files.length < 1) throw fieldError(field, 'add at least one photo of the damage')
  if (files.length > max) throw fieldError(field, `at most ${max} photos; nothing was stored`)
  for (const file of files) {
    try {
      checkClientFileName(file.filename)
    }
    catch {
      throw fieldError(field, `the file name "${file.filename.slice(0, 80)}" is not a plain file name; nothing was stored`)
    }
    if (file.data.byteLength === 0) throw fieldError(field, 'a photo is empty (0 bytes); choose it again. Nothing was stored.')
    if (file.data.byteLength > photoLimit().maxBytes) throw claimPhotosTooLarge(field, `a photo is larger than ${photoLimit().label}`)
  }
  return { files, fields }
}

/** Checks every photo by its content and re-encodes it; throws (415 or 413 naming `field`) before any is stored. */
export async function prepareClaimPhotos(files: { data: Buffer, filename: string }[], field: string): Promise<ClaimPhoto[]> {
  const prepared: ClaimPhoto[] = []
  for (const [index, file] of files.entries()) {
    if (!photoKind(file.data)) throw claimPhotoUnsupported(field, `photo ${index + 1} is ${describeNotPhoto(file.data)}, whatever its name says: only JPEG, PNG or WebP pictures are taken.`)
    try {
      const data = await sharp(file.data, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' })
        .rotate()
        .resize({ width: PHOTO_MAX_EDGE_PX, height: PHOTO_MAX_EDGE_PX, fit: 'inside', withoutEnlargement: true })
        .webp({ quality: 82 })
        .toBuffer()
      prepared.push({ data, mime: 'image/webp', originalName: fileLabel(file.filename.replace(/\.[^.]*$/, '.webp'), `claim-photo-${index + 1}.webp`) })
    }
    catch (error) {
      if (/pixel limit/i.test(error instanceof Error ? error.message : '')) throw claimPhotosTooLarge(field, `photo ${index + 1} is over ${MAX_INPUT_PIXELS / 1_000_000} megapixels`)
      throw claimPhotoUnsupported(field, `photo ${index + 1} could not be read as a picture (damaged or incomplete).`)
    }
  }
  return prepared
}
