import { randomBytes } from 'node:crypto'
import Busboy from 'busboy'
import { create as contentDisposition } from 'content-disposition'
import { resolve } from 'node:path'
import { inArray } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { AwsClient } from 'aws4fetch'
import { fileTypeFromBuffer } from 'file-type'
import parseRange from 'range-parser'
import sharp from 'sharp'
import type { Storage } from 'unstorage'
import type { UploadLimit, UploadPurpose } from '#shared/utils/catalogueSchemas'
import fsDriver from 'unstorage/drivers/fs'
import s3Driver from 'unstorage/drivers/s3'
import { files } from '../../db/schema'
import { AudioInputError, decodeWav } from '../../audio'
import type { Database, Transaction } from './db'

// Multipart framing around the one file (boundaries, part headers, a long file name) stays well below this.
const MULTIPART_ALLOWANCE_BYTES = 64 * 1024
// A JPEG of a few MB can claim a huge canvas; refuse before sharp allocates it.
const MAX_INPUT_PIXELS = 50_000_000
const PHOTO_MAX_EDGE_PX = 2000

let storageReady: Promise<Storage> | undefined

export type UploadsDriver = 'fs' | 'build' | 's3'

/** Where uploads live: NUXT_UPLOADS_DRIVER, `fs` (the folder NUXT_UPLOADS_DIR, the default), `s3` or `build`. */
export function uploadsDriver(): UploadsDriver {
  const driver = String(useRuntimeConfig().uploadsDriver)
  if (driver !== 'fs' && driver !== 'build' && driver !== 's3') throw new Error(`NUXT_UPLOADS_DRIVER must be 'fs', 's3' or 'build', not '${driver}'`)
  return driver
}

/** Whether uploads live in the local folder `NUXT_UPLOADS_DIR` (the default) rather than shared storage. */
export function uploadsOnLocalDisk(): boolean {
  return uploadsDriver() === 'fs'
}

/** The settings of an S3-compatible bucket for uploads, each read from its own variable. */
const s3SettingNames = {
  endpoint: 'NUXT_UPLOADS_S3_ENDPOINT',
  bucket: 'NUXT_UPLOADS_S3_BUCKET',
  region: 'NUXT_UPLOADS_S3_REGION',
  accessKeyId: 'NUXT_UPLOADS_S3_ACCESS_KEY_ID',
  secretAccessKey: 'NUXT_UPLOADS_S3_SECRET_ACCESS_KEY',
} as const

/**
 * The bucket NUXT_UPLOADS_DRIVER=s3 keeps uploads in. Throws naming every missing setting, and an endpoint
 * that is not an http(s) address, so a server started without them stops at once instead of failing its
 * first upload.
 */
export function s3UploadSettings(): Record<keyof typeof s3SettingNames, string> {
  const settings = {
    endpoint: process.env.NUXT_UPLOADS_S3_ENDPOINT ?? '',
    bucket: process.env.NUXT_UPLOADS_S3_BUCKET ?? '',
    region: process.env.NUXT_UPLOADS_S3_REGION ?? '',
    accessKeyId: process.env.NUXT_UPLOADS_S3_ACCESS_KEY_ID ?? '',
    secretAccessKey: process.env.NUXT_UPLOADS_S3_SECRET_ACCESS_KEY ?? '',
  }
  const missing = (Object.keys(s3SettingNames) as (keyof typeof s3SettingNames)[]).filter(key => !settings[key].trim()).map(key => s3SettingNames[key])
  if (missing.length > 0) throw new Error(`NUXT_UPLOADS_DRIVER=s3 needs ${missing.join(', ')} (the bucket that holds uploads, shared by every instance)`)
  if (!/^https?:\/\/[^/]/.test(settings.endpoint)) throw new Error(`NUXT_UPLOADS_S3_ENDPOINT must be an http or https address, e.g. https://s3.eu-central-1.example.com (got "${settings.endpoint}")`)
  return settings
}

/** The start-up check of the uploads settings (server/plugins/checkSettings.ts): throws naming the setting. */
export function checkUploadSettings() {
  if (uploadsDriver() === 's3') s3UploadSettings()
}

/**
 * The `uploads` mount of Nitro storage, chosen at run time by NUXT_UPLOADS_DRIVER: `fs` (the default)
 * mounts it again on the folder `NUXT_UPLOADS_DIR`, so tests and deployments choose it; `s3` mounts an
 * S3-compatible bucket (NUXT_UPLOADS_S3_*), shared by several instances; `build` keeps the mount written
 * in nuxt.config.ts (nitro.storage.uploads) as it was built.
 */
export function uploadStorage(): Promise<Storage> {
  storageReady ??= (async () => {
    const driver = uploadsDriver()
    if (driver !== 'build') {
      const root = useStorage()
      await root.unmount('uploads', false)
      root.mount('uploads', driver === 's3' ? s3Driver(s3UploadSettings()) : fsDriver({ base: resolve(String(useRuntimeConfig().uploadsDir)) }))
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
 * The one rule for every upload's file name. A browser sends a file's bare name; a name with a path in it
 * ("../", a slash or a backslash) or control characters comes from a hand-made request, so it is refused
 * outright rather than quietly relabelled. (The name is never used as a path either way: files are stored
 * under generated ids, and `fileLabel` keeps a cleaned copy as the label.)
 */
export function checkClientFileName(name: string | undefined) {
  const given = name ?? ''
  if (/[\\/]/.test(given) || /^\s*\.{1,2}\s*$/.test(given)) {
    throw fieldError('file', `the file name "${given.slice(0, 80)}" contains a path ("/", "\\" or ".."); send the file under its plain name. Nothing was stored.`)
  }
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(given)) throw fieldError('file', 'the file name contains control characters; rename the file. Nothing was stored.')
}

export interface UploadFormOptions {
  /** With it, a missing file is a 400 naming `file` with this text. */
  required?: string
  /** Stops the reading: the rest of the body is dropped unread. */
  signal?: AbortSignal
}

export interface UploadedFilePart {
  data: Buffer
  /** The name the client gave, checked by `checkClientFileName`; label it with `fileLabel`. */
  filename: string
}

/**
 * Reads a multipart upload: one file in the field `file`, any other fields as text. Every route that
 * takes a file reads it here, so each upload gets the same checks: the declared size against the
 * purpose's limit before a byte is read, then the body streamed through busboy into one buffer that
 * never grows past the limit (the moment the file passes it the answer is 413 and the rest of the body
 * is discarded unread), one file at most, its name (`checkClientFileName`), not empty, and text fields
 * free of control characters (`rejectControlCharacters`, as for JSON bodies). With `required` a missing
 * file is a 400 naming `file` with that text; without it `file` is null. Each refusal is a 4xx naming its field.
 */
export async function readUploadForm(event: H3Event, purpose: UploadPurpose, options: UploadFormOptions = {}): Promise<{ file: UploadedFilePart | null, fields: Record<string, string> }> {
  checkDeclaredSize(event, purpose)
  if (!/^multipart\/form-data/i.test(getRequestHeader(event, 'content-type') ?? '')) {
    throw fieldError('file', 'send the file as multipart/form-data in a field named "file"')
  }
  const { file, fileParts, fields } = await streamMultipart(event, purpose, options)
  if (fileParts > 1) throw fieldError('file', 'send one file at a time; nothing was stored')
  // The text fields get the check every JSON body gets, before any schema reads them.
  rejectControlCharacters(fields)
  if (!file) {
    if (options.required) throw fieldError('file', options.required)
    return { file: null, fields }
  }
  checkClientFileName(file.filename)
  if (file.data.byteLength === 0) throw fieldError('file', 'the file is empty (0 bytes); choose the file again. Nothing was stored.')
  return { file, fields }
}

/**
 * `readUploadForm` with the body read while `check` runs (the role check, a settings look-up), so the
 * upload does not wait on the database and the client is not held back meanwhile. The check's refusal
 * comes first (a visitor gets 401, not a complaint about the file): the body is then dropped unread,
 * having been kept only for the few milliseconds the check took.
 */
export async function readUploadFormDuring<T>(event: H3Event, purpose: UploadPurpose, check: Promise<T>, options: Omit<UploadFormOptions, 'signal'> = {}): Promise<{ file: UploadedFilePart | null, fields: Record<string, string>, checked: T }> {
  const stop = new AbortController()
  const reading = readUploadForm(event, purpose, { ...options, signal: stop.signal })
  // Its refusal is given below, after the check's; until then it must not count as unhandled.
  reading.catch(() => {})
  let checked: T
  try {
    checked = await check
  }
  catch (error) {
    stop.abort()
    throw error
  }
  return { ...(await reading), checked }
}

// A text field beside the file (notes, rpm, a few ids) is short; a longer one is refused, not cut.
const MAX_TEXT_FIELD_BYTES = 256 * 1024

/**
 * The multipart body as it arrives: the first part named `file` with a file name is gathered into a buffer
 * of at most the purpose's limit (413 the moment it would pass); other file parts are counted and discarded; text
 * fields are kept. Rejects with a 4xx naming the field; once it has rejected, the rest of the body is drained.
 */
function streamMultipart(event: H3Event, purpose: UploadPurpose, { signal }: UploadFormOptions): Promise<{ file: UploadedFilePart | null, fileParts: number, fields: Record<string, string> }> {
  const request = event.node.req
  const maxBytes = uploadLimit(purpose).maxBytes
  // The file cannot be longer than the body, whose declared size checkDeclaredSize has bounded.
  const declaredBytes = Number(getRequestHeader(event, 'content-length'))
  return new Promise((resolvePromise, reject) => {
    let parser: Busboy.Busboy
    try {
      // preservePath: busboy would otherwise cut a path off the file name, and such a name is refused, not relabelled.
      parser = Busboy({ headers: request.headers, defParamCharset: 'utf8', preservePath: true, limits: { fileSize: maxBytes, fieldSize: MAX_TEXT_FIELD_BYTES, fields: 100, parts: 200 } })
    }
    catch {
      reject(fieldError('file', 'the upload could not be read as multipart/form-data (no boundary); nothing was stored'))
      return
    }
    const fields: Record<string, string> = {}
    let file: UploadedFilePart | null = null
    let fileParts = 0
    let settled = false
    const fail = (error: unknown) => {
      if (settled) return
      settled = true
      request.unpipe(parser)
      // Whatever the client still sends is read and dropped, so the answer can go out on the same connection.
      request.resume()
      reject(error)
    }
    parser.on('field', (name, value, info) => {
      if (info.valueTruncated) return fail(fieldError(name, `longer than ${MAX_TEXT_FIELD_BYTES / 1024} KB; nothing was stored`))
      if (name && name !== 'file') fields[name] = value
    })
    parser.on('file', (name, stream, info) => {
      const filename = info.filename
      if (name !== 'file' || filename === undefined) {
        stream.resume()
        return
      }
      fileParts++
      if (fileParts > 1) {
        stream.resume()
        return
      }
      // One buffer of the body's declared size (its pages are only touched as bytes arrive), each piece copied
      // into it as it comes: the file is copied once, while the rest is still on its way. A surface test's goes
      // into shared memory, which the analysis' second thread reads without a copy (server/audio/parallel.ts).
      let data: Buffer | undefined
      let size = 0
      stream.on('data', (chunk: Buffer) => {
        if (settled) return
        const bytes = Math.min(maxBytes, declaredBytes)
        data ??= purpose === 'surface_test' ? sharedUploadBuffer(bytes) : Buffer.alloc(bytes)
        if (size + chunk.byteLength > data.byteLength) return fail(tooLarge(purpose))
        chunk.copy(data, size)
        size += chunk.byteLength
      })
      stream.on('limit', () => fail(tooLarge(purpose)))
      stream.on('end', () => {
        if (!settled) file = { data: data ? data.subarray(0, size) : Buffer.alloc(0), filename }
      })
    })
    parser.on('partsLimit', () => fail(fieldError('file', 'too many parts in the form; nothing was stored')))
    parser.on('fieldsLimit', () => fail(fieldError('file', 'too many fields in the form; nothing was stored')))
    parser.on('error', () => fail(fieldError('file', 'the upload could not be read as multipart/form-data (damaged or cut short); nothing was stored')))
    parser.on('close', () => {
      if (settled) return
      settled = true
      resolvePromise({ file, fileParts, fields })
    })
    request.on('aborted', () => fail(createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'file: the upload was cut short; nothing was stored.' })))
    signal?.addEventListener('abort', () => fail(createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'file: not read; nothing was stored.' })), { once: true })
    request.pipe(parser)
  })
}

/*
 * A surface test's upload goes into shared memory, which the analysis' second thread reads without a copy.
 * A fresh 12.6 MB buffer costs 7–10 ms to allocate and touch for the first time against 1–1.5 ms to copy into
 * one already touched, and each fresh one adds to the external memory that makes V8 collect. So a route that
 * keeps nothing of the file (the analyse route) gives its buffer back once its answer has gone out
 * (`reuseUploadAfterAnswer`), and the next surface-test upload that fits takes it. A spare unused for a minute
 * is let go, and none larger than SPARE_MAX_BYTES is kept, so an idle server holds nothing for it.
 */
const SPARE_MAX_BYTES = 32 * 1024 * 1024
const SPARE_IDLE_MS = 60_000
let spareShared: { buffer: SharedArrayBuffer, timer: NodeJS.Timeout } | null = null

function sharedUploadBuffer(bytes: number): Buffer {
  const spare = spareShared
  if (spare && spare.buffer.byteLength >= bytes) {
    clearTimeout(spare.timer)
    spareShared = null
    return Buffer.from(spare.buffer, 0, bytes)
  }
  return Buffer.from(new SharedArrayBuffer(bytes))
}

/**
 * Once this request's answer has been sent in full, the upload's shared buffer may serve the next surface-test
 * upload. Only for a route that keeps no view of the file past its answer (nothing stored from it, no work
 * left running on it); an answer that is never finished (the client went away) gives nothing back.
 */
export function reuseUploadAfterAnswer(event: H3Event, file: UploadedFilePart | null) {
  const buffer = file?.data.buffer
  if (!(buffer instanceof SharedArrayBuffer) || buffer.byteLength > SPARE_MAX_BYTES) return
  event.node.res.once('finish', () => {
    if (spareShared && spareShared.buffer.byteLength >= buffer.byteLength) return
    if (spareShared) clearTimeout(spareShared.timer)
    const timer = setTimeout(() => {
      spareShared = null
    }, SPARE_IDLE_MS).unref()
    spareShared = { buffer, timer }
  })
}

interface Sniffed {
  purpose: UploadPurpose
  mime: string
  format: string
}

const photo = (mime: string, format: string): Sniffed => ({ purpose: 'photo', mime, format })
const audio = (mime: string, format: string): Sniffed => ({ purpose: 'audio', mime, format })

/** The kinds we take, by file-type's extension: MPEG audio of any layer is read as MP3, any Ogg stream as Ogg. */
const takenKinds: Record<string, Sniffed> = {
  jpg: photo('image/jpeg', 'JPEG'),
  png: photo('image/png', 'PNG'),
  webp: photo('image/webp', 'WebP'),
  wav: audio('audio/wav', 'WAV'),
  ...Object.fromEntries(['mp3', 'mp2', 'mp1'].map(ext => [ext, audio('audio/mpeg', 'MP3')])),
  ...Object.fromEntries(['ogg', 'oga', 'opus', 'spx', 'ogv', 'ogm', 'ogx'].map(ext => [ext, audio('audio/ogg', 'Ogg')])),
}

/**
 * An ID3 tag or the 11 sync bits an MPEG audio frame starts with, in front of something file-type does not
 * recognise. Only a claim: an audio sample is then read frame by frame (`mp3Problem`), so these bytes in
 * front of anything else are refused as a damaged MP3 rather than as an unknown kind.
 */
function startsLikeMp3(bytes: Uint8Array): boolean {
  const id3 = bytes[0] === 0x49 && bytes[1] === 0x44 && bytes[2] === 0x33
  return id3 || (bytes[0] === 0xff && ((bytes[1] ?? 0) & 0xe0) === 0xe0)
}

/**
 * What the bytes are, by their content alone (file-type's signatures): the declared type and the extension
 * are not trusted. `found` is file-type's answer even for a kind we do not take, to name it in a refusal.
 */
export async function sniffFile(bytes: Uint8Array): Promise<{ taken: Sniffed | null, found: string | null }> {
  const type = await fileTypeFromBuffer(bytes).catch(() => undefined)
  const taken = type ? takenKinds[type.ext] ?? null : startsLikeMp3(bytes) ? takenKinds.mp3! : null
  return { taken, found: type ? type.ext.toUpperCase() : null }
}

function describeRefused(bytes: Uint8Array, { taken, found }: { taken: Sniffed | null, found: string | null }): string {
  const head = Buffer.from(bytes.subarray(0, 512)).toString('utf8').trimStart().toLowerCase()
  if (head.includes('<svg') || (head.startsWith('<?xml') && head.includes('svg'))) return 'an SVG drawing (SVG is refused: it can carry scripts)'
  if (head.startsWith('<')) return 'HTML or XML text'
  if (head.startsWith('#!')) return 'a script'
  if (taken) return `a ${taken.format} file`
  if (found) return `a file of type ${found}`
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
export async function storeFile(db: Database | Transaction, input: { id?: string, data: Uint8Array, mime: string, purpose: string, originalName: string, isPublic: boolean, uploadedBy: number | null }): Promise<StoredFileRow> {
  const id = input.id ?? newFileId()
  const storage = await uploadStorage()
  // Shared memory (a surface test's upload, which the analysis' second thread reads) is copied out first:
  // fetch, and so the S3 driver, refuses a body on a SharedArrayBuffer.
  await storage.setItemRaw(id, input.data.buffer instanceof SharedArrayBuffer ? new Uint8Array(input.data) : input.data)
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
 * One upload from a multipart request (field `file`, read by `readUploadForm`). The kind is decided
 * by the bytes themselves. Photos are re-encoded; audio samples are kept as sent once they have been
 * read through to the end (`checkAudioSample`). Files start private: they are shown to everyone only
 * while a product in the shop uses them.
 */
export async function receiveUpload(event: H3Event, purpose: UploadPurpose, userId: number) {
  const { file } = await readUploadForm(event, purpose, { required: 'choose a file to upload' })
  const part = file!

  const kind = await sniffFile(part.data)
  const sniffed = kind.taken
  if (!sniffed || sniffed.purpose !== purpose) throw unsupported(purpose, describeRefused(part.data, kind))
  if (purpose === 'audio') checkAudioSample(part.data, sniffed.mime)
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

const damagedSample = (message: string, status = 400) => createError({
  statusCode: status,
  statusMessage: status === 415 ? 'Unsupported Media Type' : 'Invalid input',
  message: `file: ${message} Nothing was stored.`,
  data: { fields: { file: message } },
})

/**
 * Reads an audio sample through to its end before it is kept, so that what the shop plays is a whole,
 * playable file: a WAV through the surface-test decoder (every chunk in place, the data chunk complete
 * and holding samples), an MP3 frame by frame, an Ogg page by page. Throws a 400 (415 for a WAV in an
 * encoding we do not take) naming `file`. Answers the duration the walk measured: a WAV's from its
 * header (frames ÷ sample rate), an MP3's from its frames (samples per frame ÷ sample rate, summed), an
 * Ogg's from its last page's granule position ÷ the stream's sample rate.
 */
export function checkAudioSample(bytes: Uint8Array, mime: string): { seconds: number } {
  if (mime === 'audio/wav') {
    try {
      return { seconds: decodeWav(bytes).durationS }
    }
    catch (error) {
      if (!(error instanceof AudioInputError)) throw error
      const reason = ({
        'eight-bit': 'This WAV file is 8-bit; save the sample as 16- or 24-bit PCM.',
        'bit-depth': 'This WAV file\'s sample size is not one we take; save the sample as 16- or 24-bit PCM.',
        'too-long': 'This WAV file is over 10 minutes long; a sample is a short excerpt.',
      } as Record<string, string>)[error.code] ?? error.message.replace(/\s*Export the play-through[^.]*\.\s*$/, '')
      throw damagedSample(reason, error.statusCode === 415 ? 415 : 400)
    }
  }
  const walked = mime === 'audio/mpeg' ? mp3Walk(bytes) : mime === 'audio/ogg' ? oggWalk(bytes) : { problem: 'This is not an audio file we take.', seconds: 0 }
  if (walked.problem) throw damagedSample(walked.problem)
  return { seconds: walked.seconds }
}

// MPEG-1/2/2.5 audio frame headers: bit rates in kbit/s by [version 1 or 2][layer 1–3][index], sample rates by version.
const MPEG_BITRATES = {
  v1: [
    [0, 32, 64, 96, 128, 160, 192, 224, 256, 288, 320, 352, 384, 416, 448],
    [0, 32, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320, 384],
    [0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320],
  ],
  v2: [
    [0, 32, 48, 56, 64, 80, 96, 112, 128, 144, 160, 176, 192, 224, 256],
    [0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160],
    [0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160],
  ],
}
const MPEG_SAMPLE_RATES: Record<number, number[]> = { 3: [44100, 48000, 32000], 2: [22050, 24000, 16000], 0: [11025, 12000, 8000] }

interface MpegFrame {
  /** Version bits, layer bits and sample-rate index: the same in every frame of one stream. */
  stream: number
  length: number
  /** Seconds of sound the frame holds: its samples (384, 1152, or 576 for layer 3 below MPEG-1) ÷ its sample rate. */
  seconds: number
}

/** The MPEG audio frame whose header starts at `offset`, or null if these 4 bytes are not one. */
function mpegFrameAt(bytes: Uint8Array, offset: number): MpegFrame | null {
  if (offset + 4 > bytes.length) return null
  const b1 = bytes[offset + 1]!
  const b2 = bytes[offset + 2]!
  const b3 = bytes[offset + 3]!
  if (bytes[offset] !== 0xff || (b1 & 0xe0) !== 0xe0) return null
  const version = (b1 >> 3) & 3
  const layerBits = (b1 >> 1) & 3
  const bitrateIndex = b2 >> 4
  const rateIndex = (b2 >> 2) & 3
  // Reserved version, layer, sample rate or emphasis; free-format (index 0) and the forbidden index 15.
  if (version === 1 || layerBits === 0 || rateIndex === 3 || (b3 & 3) === 2 || bitrateIndex === 0 || bitrateIndex === 15) return null
  const layer = 4 - layerBits
  const kbps = MPEG_BITRATES[version === 3 ? 'v1' : 'v2'][layer - 1]![bitrateIndex]!
  const sampleRate = MPEG_SAMPLE_RATES[version]![rateIndex]!
  const padding = (b2 >> 1) & 1
  const length = layer === 1
    ? (Math.floor((12 * kbps * 1000) / sampleRate) + padding) * 4
    : Math.floor(((layer === 3 && version !== 3 ? 72 : 144) * kbps * 1000) / sampleRate) + padding
  const samples = layer === 1 ? 384 : layer === 3 && version !== 3 ? 576 : 1152
  return { stream: (b1 & 0x1e) | (rateIndex << 5), length, seconds: samples / sampleRate }
}

/** Size of the ID3v2 tag at `offset` (header, body and footer), or 0 if there is none. */
function id3v2Size(bytes: Uint8Array, offset: number): number {
  if (offset + 10 > bytes.length || bytes[offset] !== 0x49 || bytes[offset + 1] !== 0x44 || bytes[offset + 2] !== 0x33) return 0
  const major = bytes[offset + 3]!
  const size = bytes.subarray(offset + 6, offset + 10)
  if (major < 2 || major > 4 || bytes[offset + 4] === 0xff || size.some(byte => byte >= 0x80)) return -1
  const body = (size[0]! << 21) | (size[1]! << 14) | (size[2]! << 7) | size[3]!
  return 10 + body + ((bytes[offset + 5]! & 0x10) ? 10 : 0)
}

/**
 * What is wrong with an MP3, or null: after any ID3v2 tags, MPEG audio frames of one stream must
 * follow each other to the end of the file (or to a trailing APEv2 and/or ID3v1 tag), at least two.
 */
export function mp3Problem(bytes: Uint8Array): string | null {
  return mp3Walk(bytes).problem
}

/** The MP3 walk of `mp3Problem`, with the seconds its frames hold. */
export function mp3Walk(bytes: Uint8Array): { problem: string | null, seconds: number } {
  const failed = (problem: string) => ({ problem, seconds: 0 })
  let seconds = 0
  let offset = 0
  for (let size = id3v2Size(bytes, 0); size !== 0; size = id3v2Size(bytes, offset)) {
    if (size < 0) return failed('This MP3 file\'s ID3 tag is damaged.')
    offset += size
    if (offset > bytes.length) return failed('This MP3 file is cut short: it ends inside its ID3 tag.')
  }
  let end = bytes.length
  const tagAt = (at: number, text: string) => at >= offset && [...text].every((ch, i) => bytes[at + i] === ch.charCodeAt(0))
  if (tagAt(end - 128, 'TAG')) end -= 128
  if (tagAt(end - 32, 'APETAGEX')) {
    const view = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
    const apeSize = view.readUInt32LE(end - 32 + 12) + ((view.readUInt32LE(end - 32 + 20) & 0x80000000) ? 32 : 0)
    if (apeSize < 32 || end - apeSize < offset) return failed('This MP3 file\'s APE tag is damaged.')
    end -= apeSize
  }
  let frames = 0
  let stream: number | null = null
  while (offset < end) {
    const frame = mpegFrameAt(bytes, offset)
    if (!frame || (stream !== null && frame.stream !== stream)) {
      return failed(frames === 0
        ? 'This is not a playable MP3 file: no MPEG audio frame starts where its audio should.'
        : `This MP3 file is damaged: after ${frames} audio frame${frames === 1 ? '' : 's'}, byte ${offset} is not the start of another.`)
    }
    if (offset + frame.length > end) return failed(`This MP3 file is cut short: its last audio frame needs ${frame.length} bytes but only ${end - offset} arrived. Upload the whole file again.`)
    stream = frame.stream
    offset += frame.length
    seconds += frame.seconds
    frames++
  }
  if (frames < 2) return failed('This MP3 file holds no audio.')
  return { problem: null, seconds }
}

let oggCrcTable: Uint32Array | undefined

/** The Ogg page checksum: CRC-32 with polynomial 0x04c11db7, not reflected, starting at 0. */
function oggCrc(page: Uint8Array): number {
  oggCrcTable ??= Uint32Array.from({ length: 256 }, (_, n) => {
    let value = n << 24
    for (let bit = 0; bit < 8; bit++) value = (value & 0x80000000) ? (value << 1) ^ 0x04c11db7 : value << 1
    return value >>> 0
  })
  let crc = 0
  for (let i = 0; i < page.length; i++) {
    // Bytes 22–25 hold the checksum itself and count as zeros.
    const byte = i >= 22 && i < 26 ? 0 : page[i]!
    crc = ((crc << 8) ^ oggCrcTable[((crc >>> 24) ^ byte) & 0xff]!) >>> 0
  }
  return crc
}

/**
 * What is wrong with an Ogg file, or null: pages with good checksums one after another to the end of
 * the file, the first opening a Vorbis, Opus or FLAC stream, the last closing it, audio in between.
 */
export function oggProblem(bytes: Uint8Array): string | null {
  return oggWalk(bytes).problem
}

/** The sample rate an Ogg stream's first packet declares (Opus always counts at 48 kHz), or 0. */
function oggSampleRate(view: Buffer, packet: number, end: number): number {
  const at = (offset: number, size: number) => packet + offset + size <= end
  if (view.toString('latin1', packet, packet + 7) === '\x01vorbis' && at(12, 4)) return view.readUInt32LE(packet + 12)
  if (view.toString('latin1', packet, packet + 8) === 'OpusHead') return 48_000
  // FLAC in Ogg: 0x7F "FLAC", version, header count, "fLaC", a block header, then STREAMINFO whose
  // 20-bit sample rate starts 10 bytes in.
  if (view.toString('latin1', packet, packet + 5) === '\x7fFLAC' && at(27, 3)) return (view[packet + 27]! << 12) | (view[packet + 28]! << 4) | (view[packet + 29]! >> 4)
  return 0
}

/** The Ogg walk of `oggProblem`, with the seconds its first stream's last granule position gives. */
export function oggWalk(bytes: Uint8Array): { problem: string | null, seconds: number } {
  const failed = (problem: string) => ({ problem, seconds: 0 })
  let sampleRate = 0
  let serial = 0
  let opusPreSkip = 0
  let lastGranule = 0n
  const view = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  let offset = 0
  let pages = 0
  let lastFlags = 0
  let audio = false
  while (offset < bytes.length) {
    if (offset + 27 > bytes.length) return failed('This Ogg file is cut short: it ends inside a page header. Upload the whole file again.')
    if (view.toString('latin1', offset, offset + 4) !== 'OggS' || bytes[offset + 4] !== 0) {
      return failed(pages === 0 ? 'This is not a playable Ogg file.' : `This Ogg file is damaged: after ${pages} page${pages === 1 ? '' : 's'}, byte ${offset} is not the start of another.`)
    }
    const segments = bytes[offset + 26]!
    if (offset + 27 + segments > bytes.length) return failed('This Ogg file is cut short: it ends inside a page header. Upload the whole file again.')
    let bodyLength = 0
    for (let i = 0; i < segments; i++) bodyLength += bytes[offset + 27 + i]!
    const pageEnd = offset + 27 + segments + bodyLength
    if (pageEnd > bytes.length) return failed('This Ogg file is cut short: its last page is incomplete. Upload the whole file again.')
    const page = bytes.subarray(offset, pageEnd)
    if (oggCrc(page) !== view.readUInt32LE(offset + 22)) return failed(`This Ogg file is damaged: page ${pages + 1} fails its checksum.`)
    const flags = bytes[offset + 5]!
    if (pages === 0) {
      const first = view.toString('latin1', offset + 27 + segments, Math.min(pageEnd, offset + 27 + segments + 8))
      if (!(flags & 2)) return failed('This Ogg file is damaged: its first page does not open a stream.')
      if (!['\x01vorbis', 'OpusHead', '\x7fFLAC'].some(codec => first.startsWith(codec))) return failed('This Ogg file holds no Vorbis, Opus or FLAC audio.')
      serial = view.readUInt32LE(offset + 14)
      sampleRate = oggSampleRate(view, offset + 27 + segments, pageEnd)
      if (first.startsWith('OpusHead') && offset + 27 + segments + 12 <= pageEnd) opusPreSkip = view.readUInt16LE(offset + 27 + segments + 10)
    }
    const granule = view.readBigInt64LE(offset + 6)
    if (granule > 0n) audio = true
    // A page that ends no packet carries -1; only the first stream's pages count.
    if (granule > 0n && view.readUInt32LE(offset + 14) === serial) lastGranule = granule
    lastFlags = flags
    pages++
    offset = pageEnd
  }
  if (!(lastFlags & 4)) return failed('This Ogg file is cut short: its stream never ends. Upload the whole file again.')
  if (!audio) return failed('This Ogg file holds no audio.')
  return { problem: null, seconds: sampleRate > 0 ? Math.max(0, Number(lastGranule) - opusPreSkip) / sampleRate : 0 }
}

export async function readStoredFile(id: string): Promise<Buffer | null> {
  const storage = await uploadStorage()
  const raw = await storage.getItemRaw<Buffer>(id).catch(() => null)
  return raw ? Buffer.from(raw) : null
}

let bucketClient: AwsClient | undefined

/**
 * Bytes `start`–`end` (inclusive) of an object in the uploads bucket, asked of the bucket with a Range
 * header so a seek in a long recording does not fetch the whole file; with the object's full size from the
 * answer's Content-Range. Null when there is no such object.
 */
async function readBucketRange(id: string, start: number, end: number): Promise<{ data: Buffer, size: number } | null> {
  const settings = s3UploadSettings()
  bucketClient ??= new AwsClient({ service: 's3', region: settings.region, accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey })
  const target = `${settings.endpoint.replace(/\/+$/, '')}/${settings.bucket}/${encodeURIComponent(id)}`
  const answer = await bucketClient.fetch(target, { headers: { range: `bytes=${start}-${end}` } })
  if (answer.status === 404) return null
  const total = /\/(\d+)$/.exec(answer.headers.get('content-range') ?? '')?.[1]
  if (answer.status !== 206 || !total) throw new Error(`the uploads bucket answered ${answer.status} to a range request for ${id}`)
  return { data: Buffer.from(await answer.arrayBuffer()), size: Number(total) }
}

/**
 * What to send for a stored file asked with an optional Range header: the whole file, the one asked range
 * with the file's size, or 'unsatisfiable' (416). `recordedBytes` is the size the files table holds; in a
 * bucket (NUXT_UPLOADS_DRIVER=s3) a range is fetched as a range, elsewhere the file is read and sliced.
 * Null when the file is not in storage.
 */
export async function readStoredFilePart(id: string, rangeHeader: string | undefined, recordedBytes: number): Promise<
  { whole: Buffer } | { part: Buffer, start: number, end: number, size: number } | { unsatisfiable: number } | null
> {
  if (rangeHeader && uploadsDriver() === 's3') {
    const range = parseByteRange(rangeHeader, recordedBytes)
    if (range === 'unsatisfiable') return { unsatisfiable: recordedBytes }
    if (range) {
      const found = await readBucketRange(id, range.start, range.end)
      return found && { part: found.data, start: range.start, end: range.start + found.data.byteLength - 1, size: found.size }
    }
  }
  const data = await readStoredFile(id)
  if (!data) return null
  const range = parseByteRange(rangeHeader, data.byteLength)
  if (range === 'unsatisfiable') return { unsatisfiable: data.byteLength }
  if (!range) return { whole: data }
  return { part: data.subarray(range.start, range.end + 1), start: range.start, end: range.end, size: data.byteLength }
}

/**
 * One `bytes=` range of a file of `size` bytes (range-parser); null to send the whole file (no header, a
 * malformed one, another unit, or several ranges, which the standard allows); 'unsatisfiable' for 416.
 */
export function parseByteRange(header: string | undefined, size: number): { start: number, end: number } | 'unsatisfiable' | null {
  if (!header) return null
  const ranges = parseRange(size, header.trim())
  if (ranges === -2) return null
  if (ranges === -1) {
    // A suffix longer than the file asks for all of it (RFC 9110, 14.1.2); range-parser calls it unsatisfiable.
    return size > 0 && /^bytes=-0*[1-9]\d*$/.test(header.trim()) ? { start: 0, end: size - 1 } : 'unsatisfiable'
  }
  if (ranges.type !== 'bytes' || ranges.length !== 1) return null
  return { start: ranges[0]!.start, end: ranges[0]!.end }
}

/** Content-Disposition with the file's label, safe for the header in ASCII and exact in UTF-8. */
export function inlineDisposition(label: string): string {
  return contentDisposition(label, { type: 'inline' })
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
