import { randomBytes } from 'node:crypto'
import { resolve } from 'node:path'
import { inArray } from 'drizzle-orm'
import type { H3Event } from 'h3'
import sharp from 'sharp'
import type { Storage } from 'unstorage'
import type { UploadLimit, UploadPurpose } from '#shared/utils/catalogueSchemas'
import fsDriver from 'unstorage/drivers/fs'
import { files } from '../db/schema'
import type { Database, Transaction } from './db'

export type StoredFile = typeof files.$inferSelect

// Multipart framing around the one file (boundaries, part headers, a long file name) stays well below this.
const MULTIPART_ALLOWANCE_BYTES = 64 * 1024
// A JPEG of a few MB can claim a huge canvas; refuse before sharp allocates it.
const MAX_INPUT_PIXELS = 50_000_000
const PHOTO_MAX_EDGE_PX = 2000

let storageReady: Promise<Storage> | undefined

/** Whether uploads live in the local folder `NUXT_UPLOADS_DIR` (the default) rather than shared storage. */
export function uploadsOnLocalDisk(): boolean {
  const driver = String(useRuntimeConfig().uploadsDriver)
  if (driver !== 'fs' && driver !== 'build') throw new Error(`NUXT_UPLOADS_DRIVER must be 'fs' or 'build', not '${driver}'`)
  return driver === 'fs'
}

/**
 * The `uploads` mount of Nitro storage. With NUXT_UPLOADS_DRIVER=fs (the default) it is mounted again
 * at run time on the folder `NUXT_UPLOADS_DIR`, so tests and deployments choose it; with `build` the
 * mount written in nuxt.config.ts (nitro.storage.uploads, e.g. an S3-compatible bucket) is kept.
 */
export function uploadStorage(): Promise<Storage> {
  storageReady ??= (async () => {
    if (uploadsOnLocalDisk()) {
      const base = resolve(String(useRuntimeConfig().uploadsDir))
      const root = useStorage()
      await root.unmount('uploads', false)
      root.mount('uploads', fsDriver({ base }))
    }
    return useStorage('uploads')
  })()
  return storageReady
}

/** A fresh, unguessable storage key; the client's file name never becomes a path. */
export function newFileId(): string {
  return randomBytes(18).toString('base64url')
}

export function storedFileUrl(id: string): string {
  return `/files/${id}`
}

/** The client's file name, kept only as a label: last path segment, plain characters, no leading dots. */
export function fileLabel(clientName: string | undefined, fallback: string): string {
  const lastSegment = (clientName ?? '').split(/[\\/]/).pop() ?? ''
  const cleaned = lastSegment.normalize('NFKC')
    .replace(/[^\p{L}\p{N} ._()-]+/gu, '_')
    .replace(/\s+/g, ' ')
    .replace(/^[\s._]+/, '')
    .trim()
  return cleaned.slice(-120) || fallback
}

/**
 * A browser sends a file's bare name; a name with a path in it ("../", a slash or a backslash) or control characters
 * comes from a hand-made request, so it is refused outright rather than quietly relabelled. (The name is
 * never used as a path either way: files are stored under generated ids.)
 */
export function checkClientFileName(name: string | undefined) {
  const given = name ?? ''
  if (/[\\/]/.test(given) || /^\s*\.{1,2}\s*$/.test(given)) {
    throw fieldError('file', `the file name "${given.slice(0, 80)}" contains a path ("/", "\\" or ".."); send the file under its plain name. Nothing was stored.`)
  }
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(given)) throw fieldError('file', 'the file name contains control characters; rename the file. Nothing was stored.')
}

interface Sniffed {
  purpose: UploadPurpose
  mime: string
  format: string
}

const startsWith = (bytes: Uint8Array, signature: number[], offset = 0) => signature.every((value, i) => bytes[offset + i] === value)
const ascii = (text: string) => [...text].map(ch => ch.charCodeAt(0))

/** An MPEG audio frame header (11 sync bits, a valid version, layer, bit rate and sample rate). */
function isMpegFrame(bytes: Uint8Array): boolean {
  const [b0 = 0, b1 = 0, b2 = 0] = bytes
  return b0 === 0xff && (b1 & 0xe0) === 0xe0 && ((b1 >> 3) & 3) !== 1 && ((b1 >> 1) & 3) !== 0 && (b2 >> 4) !== 15 && ((b2 >> 2) & 3) !== 3
}

/** What the bytes are, by their first bytes alone: the declared type and the extension are not trusted. */
export function sniffFile(bytes: Uint8Array): Sniffed | null {
  if (startsWith(bytes, [0xff, 0xd8, 0xff])) return { purpose: 'photo', mime: 'image/jpeg', format: 'JPEG' }
  if (startsWith(bytes, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return { purpose: 'photo', mime: 'image/png', format: 'PNG' }
  if (startsWith(bytes, ascii('RIFF')) && startsWith(bytes, ascii('WEBP'), 8)) return { purpose: 'photo', mime: 'image/webp', format: 'WebP' }
  if (startsWith(bytes, ascii('RIFF')) && startsWith(bytes, ascii('WAVE'), 8)) return { purpose: 'audio', mime: 'audio/wav', format: 'WAV' }
  if (startsWith(bytes, ascii('OggS'))) return { purpose: 'audio', mime: 'audio/ogg', format: 'Ogg' }
  if (startsWith(bytes, ascii('ID3')) || isMpegFrame(bytes)) return { purpose: 'audio', mime: 'audio/mpeg', format: 'MP3' }
  return null
}

function describeRefused(bytes: Uint8Array): string {
  const head = Buffer.from(bytes.subarray(0, 512)).toString('utf8').trimStart().toLowerCase()
  if (head.includes('<svg') || (head.startsWith('<?xml') && head.includes('svg'))) return 'an SVG drawing (SVG is refused: it can carry scripts)'
  if (head.startsWith('<')) return 'HTML or XML text'
  if (head.startsWith('#!')) return 'a script'
  if (sniffFile(bytes)) return `a ${sniffFile(bytes)!.format} file`
  return 'of a kind we do not take'
}

/** This server's limit for one kind of upload (the surface-test size comes from the runtime config). */
export function uploadLimit(purpose: UploadPurpose): UploadLimit {
  return uploadLimitOf(purpose, useRuntimeConfig().public.surfaceTestMaxMb)
}

export function tooLarge(purpose: UploadPurpose) {
  const limit = uploadLimit(purpose)
  return createError({
    statusCode: 413,
    statusMessage: 'Payload Too Large',
    message: `file: the ${({ photo: 'photo', audio: 'audio sample', surface_test: 'recording' } as Record<string, string>)[purpose] ?? 'file'} is larger than ${limit.label}; nothing was stored.`,
    data: { fields: { file: `larger than ${limit.label}` } },
  })
}

function unsupported(purpose: UploadPurpose, what: string) {
  const limit = uploadLimits[purpose]
  return createError({
    statusCode: 415,
    statusMessage: 'Unsupported Media Type',
    message: `file: only ${limit.types} files are taken here; by its content this file is ${what}, whatever its name says. Nothing was stored.`,
    data: { fields: { file: `only ${limit.types}` } },
  })
}

/** Refuses an upload whose declared size is over the limit, before a byte of the body is read. */
export function checkDeclaredSize(event: H3Event, purpose: UploadPurpose) {
  const header = getRequestHeader(event, 'content-length')
  if (!header || !/^\d+$/.test(header)) {
    throw createError({ statusCode: 411, statusMessage: 'Length Required', message: 'file: the upload must state its size (Content-Length); nothing was stored.' })
  }
  if (Number(header) > uploadLimit(purpose).maxBytes + MULTIPART_ALLOWANCE_BYTES) throw tooLarge(purpose)
}

interface Prepared {
  data: Buffer
  mime: string
  width?: number
  height?: number
}

/** Decodes the photo and writes a new WebP: no metadata (GPS, camera), at most 2000 px on a side. */
async function reencodePhoto(bytes: Buffer): Promise<Prepared> {
  try {
    const image = sharp(bytes, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' })
    const { data, info } = await image
      .rotate()
      .resize({ width: PHOTO_MAX_EDGE_PX, height: PHOTO_MAX_EDGE_PX, fit: 'inside', withoutEnlargement: true })
      .webp({ quality: 82 })
      .toBuffer({ resolveWithObject: true })
    return { data, mime: 'image/webp', width: info.width, height: info.height }
  }
  catch (error) {
    const reason = error instanceof Error ? error.message : String(error)
    if (/pixel limit/i.test(reason)) {
      throw createError({ statusCode: 413, statusMessage: 'Payload Too Large', message: `file: the photo is over ${MAX_INPUT_PIXELS / 1_000_000} megapixels; nothing was stored.`, data: { fields: { file: 'too many pixels' } } })
    }
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: 'file: the photo could not be read as an image (damaged or incomplete); nothing was stored.', data: { fields: { file: 'not a readable image' } } })
  }
}

/** Writes bytes under a generated key and records them; the row and the bytes stand or fall together. */
export async function storeFile(db: Database | Transaction, input: { id?: string, data: Uint8Array, mime: string, purpose: string, originalName: string, isPublic: boolean, uploadedBy: number | null }): Promise<StoredFile> {
  const id = input.id ?? newFileId()
  const storage = await uploadStorage()
  await storage.setItemRaw(id, input.data)
  try {
    const [row] = await db.insert(files).values({
      id,
      purpose: input.purpose,
      mime: input.mime,
      bytes: input.data.byteLength,
      originalName: input.originalName,
      isPublic: input.isPublic,
      uploadedBy: input.uploadedBy,
    }).returning()
    return row!
  }
  catch (error) {
    await storage.removeItem(id).catch(() => undefined)
    throw error
  }
}

/**
 * One upload from a multipart request (field `file`). The size is checked from Content-Length
 * before parsing (the parser holds the whole body in memory), the kind from the bytes themselves.
 * Photos are re-encoded; audio samples are kept as sent. Files start private: they become public
 * when attached to a product.
 */
export async function receiveUpload(event: H3Event, purpose: UploadPurpose, userId: number) {
  checkDeclaredSize(event, purpose)
  if (!/^multipart\/form-data/i.test(getRequestHeader(event, 'content-type') ?? '')) {
    throw fieldError('file', 'send the file as multipart/form-data in a field named "file"')
  }
  const parts = await readMultipartFormData(event)
  const part = parts?.find(candidate => candidate.name === 'file' && candidate.filename !== undefined)
  if (!part) throw fieldError('file', 'choose a file to upload')
  checkClientFileName(part.filename)
  if (part.data.byteLength === 0) throw fieldError('file', 'the file is empty')
  if (part.data.byteLength > uploadLimit(purpose).maxBytes) throw tooLarge(purpose)

  const sniffed = sniffFile(part.data)
  if (!sniffed || sniffed.purpose !== purpose) throw unsupported(purpose, describeRefused(part.data))
  const prepared: Prepared = purpose === 'photo' ? await reencodePhoto(part.data) : { data: part.data, mime: sniffed.mime }
  const extension = prepared.mime.split('/')[1]!.replace('mpeg', 'mp3')
  const originalName = fileLabel(part.filename, `${purpose}.${extension}`)

  const stored = await storeFile(await useDB(), { data: prepared.data, mime: prepared.mime, purpose, originalName, isPublic: false, uploadedBy: userId })
  setResponseStatus(event, 201)
  return {
    id: stored.id,
    url: storedFileUrl(stored.id),
    purpose,
    mime: stored.mime,
    bytes: stored.bytes,
    originalName: stored.originalName,
    width: prepared.width ?? null,
    height: prepared.height ?? null,
  }
}

export async function readStoredFile(id: string): Promise<Buffer | null> {
  const storage = await uploadStorage()
  const raw = await storage.getItemRaw<Buffer>(id).catch(() => null)
  return raw ? Buffer.from(raw) : null
}

/** One `bytes=` range of a file of `size` bytes; null to send the whole file; 'unsatisfiable' for 416. */
export function parseByteRange(header: string | undefined, size: number): { start: number, end: number } | 'unsatisfiable' | null {
  if (!header) return null
  const match = /^bytes=(\d*)-(\d*)$/.exec(header.trim())
  // Several ranges or another unit: the whole file, which the standard allows.
  if (!match) return null
  const [, from = '', to = ''] = match
  if (from === '' && to === '') return null
  if (from === '') {
    const suffix = Number(to)
    if (suffix === 0) return 'unsatisfiable'
    return { start: Math.max(0, size - suffix), end: size - 1 }
  }
  const start = Number(from)
  const end = to === '' ? size - 1 : Math.min(Number(to), size - 1)
  if (start >= size || end < start) return 'unsatisfiable'
  return { start, end }
}

/** Content-Disposition with the file's label, safe for the header in ASCII and exact in UTF-8. */
export function inlineDisposition(label: string): string {
  const plain = label.replace(/[^\x20-\x7E]/g, '_').replace(/["\\]/g, '_')
  return `inline; filename="${plain}"; filename*=UTF-8''${encodeURIComponent(label)}`
}

/**
 * Checks that the ids a product is given are uploaded photos and an audio sample, then makes them
 * public: a product's pictures and sample are heard and seen in the shop by anyone.
 */
export async function publishProductFiles(tx: Database | Transaction, photoFileIds: string[] | undefined, sampleFileId: string | null | undefined) {
  const wanted = [...(photoFileIds ?? []), ...(sampleFileId ? [sampleFileId] : [])]
  if (wanted.length === 0) return
  const rows = await tx.select({ id: files.id, purpose: files.purpose }).from(files).where(inArray(files.id, wanted))
  const purposeOf = new Map(rows.map(row => [row.id, row.purpose]))
  for (const id of photoFileIds ?? []) {
    if (purposeOf.get(id) !== 'photo') throw fieldError('photoFileIds', `no uploaded photo has the id ${id}`)
  }
  if (sampleFileId && purposeOf.get(sampleFileId) !== 'audio') throw fieldError('sampleFileId', `no uploaded audio sample has the id ${sampleFileId}`)
  await tx.update(files).set({ isPublic: true }).where(inArray(files.id, wanted))
}
