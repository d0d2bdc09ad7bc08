import { mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { encodeWav, makeToneSignal } from '../../server/audio/synth'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-uploads-'))
await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let collector: Client
let shipper: Client

beforeAll(async () => {
  // The health route answers once the database is migrated and the demo seeded.
  expect((await new Client().get('/api/health')).status).toBe(200)
  maker = await signedIn(account('maker').email, account('maker').password)
  collector = await signedIn(account('collector').email, account('collector').password)
  shipper = await signedIn(account('shipper').email, account('shipper').password)
})

afterAll(() => rmSync(uploadsDir, { recursive: true, force: true }))

interface UploadFile {
  name: string
  bytes: Uint8Array
  type?: string
}

/** A multipart upload as a browser sends it: the session cookie and this site's Origin. */
async function upload(client: Client | null, kind: 'photo' | 'audio', file: UploadFile) {
  const form = new FormData()
  form.append('file', new Blob([file.bytes], { type: file.type ?? 'application/octet-stream' }), file.name)
  const target = url(`/api/workshop/uploads/${kind}`)
  const headers: Record<string, string> = { origin: new URL(target).origin, accept: 'application/json' }
  if (client?.cookies.size) headers.cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(target, { method: 'POST', body: form, headers })
  const text = await response.text()
  let body: any = text
  try {
    body = JSON.parse(text)
  }
  catch { /* not JSON */ }
  return { status: response.status, body }
}

async function fetchFile(client: Client | null, path: string, headers: Record<string, string> = {}) {
  const all: Record<string, string> = { ...headers }
  if (client?.cookies.size) all.cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(url(path), { headers: all })
  return { status: response.status, headers: response.headers, bytes: new Uint8Array(await response.arrayBuffer()) }
}

/** What is kept: rows in `files` (through the maker's API) and files in the storage folder. */
async function stored() {
  const rows = await maker.get('/api/workshop/uploads')
  expect(rows.status).toBe(200)
  return { rows: rows.body.length as number, onDisk: readdirSync(uploadsDir, { recursive: true }).length }
}

const pngOf = (width: number, height: number, colour = { r: 180, g: 60, b: 40 }) =>
  sharp({ create: { width, height, channels: 3, background: colour } }).png().toBuffer()

let slugCounter = 0
const newProduct = (overrides: Record<string, unknown> = {}) => ({
  slug: `test-cylinder-${Date.now()}-${++slugCounter}`,
  title: 'Gasworks Gavotte',
  kind: 'recorded',
  format: 'two_minute',
  rpm: 160,
  material: 'Stearic acid wax (hard, black)',
  priceMinor: 3400,
  stock: 5,
  performer: 'The Fennel Street Players',
  runningTimeS: 120,
  description: 'A test cylinder.',
  ...overrides,
})

describe('the demo catalogue', () => {
  it('holds blanks by format and wax, a dozen invented recordings, one hidden and one sold out', async () => {
    const answer = await maker.get('/api/workshop/products')
    expect(answer.status).toBe(200)
    const items = answer.body.items as any[]
    const blanks = items.filter(p => p.kind === 'blank')
    const recordings = items.filter(p => p.kind === 'recorded')
    expect(blanks.map(b => `${b.format} ${b.material}`).sort()).toEqual([
      'four_minute Paraffin wax blend (amber)',
      'four_minute Stearic acid wax (hard, black)',
      'two_minute Paraffin wax blend (amber)',
      'two_minute Stearic acid wax (hard, black)',
    ])
    expect(recordings.length).toBeGreaterThanOrEqual(12)
    expect(items.filter(p => p.hidden).map(p => p.slug)).toEqual(['whistling-study-no-3'])
    expect(items.find(p => p.slug === 'reel-for-a-cracked-mandrel')).toMatchObject({ stock: 0, madeToOrder: false })
    for (const record of recordings) {
      expect(record.performer).toBeTruthy()
      expect(record.runningTimeS).toBeGreaterThan(0)
      expect(record.photoFileIds.length).toBeGreaterThanOrEqual(1)
      expect(record.sampleFileId).toBeTruthy()
    }
  })

  it('serves the drawn photos and the generated samples to anyone, small and in the stated format', async () => {
    const record = (await maker.get('/api/workshop/products?q=tallow')).body.items[0]
    const photo = await fetchFile(null, `/files/${record.photoFileIds[0]}`)
    expect(photo.status).toBe(200)
    expect(photo.headers.get('content-type')).toBe('image/webp')
    const meta = await sharp(photo.bytes).metadata()
    expect(meta.format).toBe('webp')
    expect(meta.width).toBeGreaterThan(400)

    const sample = await fetchFile(null, `/files/${record.sampleFileId}`)
    expect(sample.status).toBe(200)
    expect(sample.headers.get('content-type')).toBe('audio/wav')
    expect(sample.bytes.byteLength).toBeLessThanOrEqual(300_000)
    const header = new DataView(sample.bytes.buffer)
    expect(new TextDecoder().decode(sample.bytes.subarray(0, 4))).toBe('RIFF')
    expect(header.getUint16(22, true)).toBe(1) // mono
    expect(header.getUint32(24, true)).toBe(22_050) // sample rate
    expect(header.getUint16(34, true)).toBe(16) // bits per sample
    // The seed writes through the uploads storage, under its own ids.
    expect(readdirSync(uploadsDir)).toContain(record.sampleFileId)
  })
})

describe('catalogue editing', () => {
  it('creates a product and reads it back', async () => {
    const input = newProduct()
    const created = await maker.post('/api/workshop/products', input)
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ slug: input.slug, title: 'Gasworks Gavotte', priceMinor: 3400, stock: 5, hidden: false, rpm: 160 })
    const read = await maker.get(`/api/workshop/products/${created.body.id}`)
    expect(read.status).toBe(200)
    expect(read.body.product.slug).toBe(input.slug)
    expect(read.body.currency).toBe('USD')
  })

  it('logs every price and stock change with who, when, and old → new', async () => {
    const created = (await maker.post('/api/workshop/products', newProduct())).body
    const edited = await maker.request(`/api/workshop/products/${created.id}`, { method: 'PATCH', body: { priceMinor: 3650, stock: 3, stockSeen: 5, title: 'Gasworks Gavotte (second cut)' } })
    expect(edited.status).toBe(200)
    expect(edited.body).toMatchObject({ priceMinor: 3650, stock: 3, title: 'Gasworks Gavotte (second cut)' })
    const hidden = await maker.request(`/api/workshop/products/${created.id}`, { method: 'PATCH', body: { hidden: true } })
    expect(hidden.body.hidden).toBe(true)

    const log = await maker.get(`/api/workshop/products/${created.id}/changes`)
    expect(log.status).toBe(200)
    const entries = (log.body as any[]).map(e => ({ field: e.field, oldValue: e.oldValue, newValue: e.newValue, userName: e.userName }))
    const makerName = account('maker').name
    expect(entries).toEqual(expect.arrayContaining([
      { field: 'priceMinor', oldValue: '3400', newValue: '3650', userName: makerName },
      { field: 'stock', oldValue: '5', newValue: '3', userName: makerName },
      { field: 'hidden', oldValue: 'false', newValue: 'true', userName: makerName },
      { field: 'priceMinor', oldValue: null, newValue: '3400', userName: makerName },
    ]))
    // The title is not a logged field, and nothing is logged twice.
    expect(entries.filter(e => e.field === 'priceMinor')).toHaveLength(2)
    for (const entry of log.body) expect(Date.now() - new Date(entry.at).getTime()).toBeLessThan(60_000)
  })

  it('refuses a stock count made before a sale instead of overwriting the sale, and logs nothing', async () => {
    const created = (await maker.post('/api/workshop/products', newProduct({ stock: 4 }))).body
    const stale = await maker.request(`/api/workshop/products/${created.id}`, { method: 'PATCH', body: { stock: 9, stockSeen: 6 } })
    expect(stale.status).toBe(409)
    expect(stale.body.data.fields.stock).toMatch(/now 4/)
    expect((await maker.get(`/api/workshop/products/${created.id}`)).body.product.stock).toBe(4)
    const log = (await maker.get(`/api/workshop/products/${created.id}/changes`)).body as any[]
    expect(log.filter(e => e.field === 'stock')).toHaveLength(1)
  })

  it('names the field that needs fixing', async () => {
    const badSlug = await maker.post('/api/workshop/products', newProduct({ slug: '../Not A Slug' }))
    expect(badSlug.status).toBe(400)
    expect(badSlug.body.data.fields.slug).toMatch(/a–z/)
    const noPerformer = await maker.post('/api/workshop/products', newProduct({ performer: null }))
    expect(noPerformer.status).toBe(400)
    expect(noPerformer.body.data.fields.performer).toMatch(/required/)
    // 2-minute at 160 rpm: 3.6 in × 100 ÷ 160 = 2.25 min = 135 s (cylinder technical notes; arithmetic).
    const tooLong = await maker.post('/api/workshop/products', newProduct({ runningTimeS: 136 }))
    expect(tooLong.status).toBe(400)
    expect(tooLong.body.data.fields.runningTimeS).toMatch(/2:15/)
    const negative = await maker.post('/api/workshop/products', newProduct({ priceMinor: -1, stock: 1.5 }))
    expect(negative.status).toBe(400)
    expect(Object.keys(negative.body.data.fields).sort()).toEqual(['priceMinor', 'stock'])
    const first = newProduct()
    expect((await maker.post('/api/workshop/products', first)).status).toBe(201)
    const again = await maker.post('/api/workshop/products', { ...first, title: 'Another' })
    expect(again.status).toBe(409)
    expect(again.body.data.fields.slug).toMatch(/already used/)
  })

  it('lists hidden products for the maker, with search and a kind filter', async () => {
    const hidden = await maker.get('/api/workshop/products?visibility=hidden')
    expect(hidden.body.items.every((p: any) => p.hidden)).toBe(true)
    const blanks = await maker.get('/api/workshop/products?kind=blank')
    expect(blanks.body.items.length).toBe(4)
    const search = await maker.get('/api/workshop/products?q=whistling')
    expect(search.body.items.map((p: any) => p.slug)).toEqual(['whistling-study-no-3'])
    expect((await maker.get('/api/workshop/products?kind=custom')).status).toBe(400)
  })
})

describe('only makers edit the catalogue', () => {
  const routes: { method: string, path: string, body?: unknown }[] = [
    { method: 'GET', path: '/api/workshop/products' },
    { method: 'POST', path: '/api/workshop/products', body: newProduct() },
    { method: 'GET', path: '/api/workshop/products/1' },
    { method: 'PATCH', path: '/api/workshop/products/1', body: { priceMinor: 1 } },
    { method: 'GET', path: '/api/workshop/products/1/changes' },
    { method: 'GET', path: '/api/workshop/uploads' },
  ]

  it('answers 401 to an anonymous visitor and 403 to a collector or a shipper on every route', async () => {
    for (const route of routes) {
      const anonymous = await new Client().request(route.path, { method: route.method, body: route.body })
      expect(anonymous.status, `${route.method} ${route.path} anonymous`).toBe(401)
      for (const [role, client] of [['collector', collector], ['shipper', shipper]] as const) {
        const answer = await client.request(route.path, { method: route.method, body: route.body })
        expect(answer.status, `${route.method} ${route.path} as ${role}`).toBe(403)
      }
    }
    const png = { name: 'a.png', bytes: await pngOf(20, 20), type: 'image/png' }
    for (const kind of ['photo', 'audio'] as const) {
      expect((await upload(null, kind, png)).status, `${kind} upload anonymous`).toBe(401)
      expect((await upload(collector, kind, png)).status, `${kind} upload as collector`).toBe(403)
      expect((await upload(shipper, kind, png)).status, `${kind} upload as shipper`).toBe(403)
    }
    // The price of product 1 is what the seed gave it.
    const first = (await maker.get('/api/workshop/products/1')).body.product
    expect(first.priceMinor).not.toBe(1)
  })
})

describe('uploads', () => {
  it('refuses a script renamed .jpg with 415 and a message, and stores nothing', async () => {
    const before = await stored()
    const script = new TextEncoder().encode('#!/bin/sh\necho "not a photo"\n')
    const answer = await upload(maker, 'photo', { name: 'holiday.jpg', bytes: script, type: 'image/jpeg' })
    expect(answer.status).toBe(415)
    expect(answer.body.message).toMatch(/JPEG, PNG or WebP.*a script/)
    expect(await stored()).toEqual(before)
  })

  it('refuses an SVG carrying a script, whatever it is called', async () => {
    const before = await stored()
    const svg = new TextEncoder().encode('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg"><script>alert(document.cookie)</script><rect width="10" height="10"/></svg>')
    for (const name of ['logo.svg', 'logo.png']) {
      const answer = await upload(maker, 'photo', { name, bytes: svg, type: name.endsWith('svg') ? 'image/svg+xml' : 'image/png' })
      expect(answer.status).toBe(415)
      expect(answer.body.message).toMatch(/SVG/)
    }
    expect(await stored()).toEqual(before)
  })

  it('refuses a 9 MB image with 413 and stores nothing', async () => {
    const before = await stored()
    // Noise does not compress: an uncompressed-size PNG just over 9 MB.
    const width = 1800
    const height = 1750
    const noise = Buffer.alloc(width * height * 3)
    for (let i = 0; i < noise.length; i++) noise[i] = (i * 2654435761) >>> 24
    const big = await sharp(noise, { raw: { width, height, channels: 3 } }).png({ compressionLevel: 0 }).toBuffer()
    expect(big.byteLength).toBeGreaterThan(9 * 1024 * 1024)
    const answer = await upload(maker, 'photo', { name: 'big.png', bytes: big, type: 'image/png' })
    expect(answer.status).toBe(413)
    expect(answer.body.message).toMatch(/larger than 8 MB/)
    expect(await stored()).toEqual(before)
  })

  it('answers 413 from the declared size alone, before the body arrives', async () => {
    const target = new URL(url('/api/workshop/uploads/photo'))
    const declared = 9 * 1024 * 1024
    const status = await new Promise<number>((resolve, reject) => {
      const req = httpRequest({
        host: target.hostname,
        port: target.port,
        path: target.pathname,
        method: 'POST',
        headers: {
          'origin': target.origin,
          'cookie': [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; '),
          'content-type': 'multipart/form-data; boundary=x',
          'content-length': String(declared),
        },
      }, (res) => {
        resolve(res.statusCode ?? 0)
        res.resume()
        req.destroy()
      })
      req.on('error', reject)
      // Only the first kilobyte is ever sent: an answer means the server did not wait for the rest.
      req.write(Buffer.alloc(1024))
      setTimeout(() => reject(new Error('no answer before the body was complete')), 10_000)
    })
    expect(status).toBe(413)
  })

  it('refuses a file named with ../, / or \\ with 400 and a message, and stores nothing', async () => {
    const before = await stored()
    const png = await pngOf(64, 48)
    for (const name of ['../../../etc/evil.png', 'photos/evil.png', '..\\..\\evil.png', '..']) {
      const answer = await upload(maker, 'photo', { name, bytes: png, type: 'image/png' })
      expect(answer.status, name).toBe(400)
      expect(answer.body.data.fields.file, name).toMatch(/path/)
      expect(answer.body.message, name).toMatch(/Nothing was stored/)
    }
    expect(await stored()).toEqual(before)
    expect(readdirSync(uploadsDir, { recursive: true }).some(name => String(name).includes('evil'))).toBe(false)
    expect(readdirSync(join(uploadsDir, '..')).some(name => name.includes('evil'))).toBe(false)
    // The same bytes under a plain name are taken: the refusal was for the name alone.
    const plain = await upload(maker, 'photo', { name: 'evil.png', bytes: png, type: 'image/png' })
    expect(plain.status).toBe(201)
    expect(plain.body.originalName).toBe('evil.png')
    expect(readdirSync(uploadsDir)).toContain(plain.body.id)
  })

  it('re-encodes a valid PNG (no metadata, at most 2000 px) and serves it by id with the right headers', async () => {
    const original = await sharp({ create: { width: 3000, height: 1200, channels: 3, background: { r: 20, g: 90, b: 70 } } })
      .png().withExif({ IFD0: { Copyright: 'Test Maker', ImageDescription: 'secret location' } }).toBuffer()
    expect((await sharp(original).metadata()).exif).toBeDefined()
    const answer = await upload(maker, 'photo', { name: 'Wide shot.png', bytes: original, type: 'image/png' })
    expect(answer.status).toBe(201)
    expect(answer.body).toMatchObject({ url: `/files/${answer.body.id}`, mime: 'image/webp', width: 2000, height: 800 })

    const served = await fetchFile(maker, answer.body.url)
    expect(served.status).toBe(200)
    expect(served.headers.get('content-type')).toBe('image/webp')
    expect(served.headers.get('x-content-type-options')).toBe('nosniff')
    expect(served.headers.get('content-disposition')).toMatch(/^inline; filename="Wide shot.png"/)
    expect(served.headers.get('cache-control')).toMatch(/private/)
    const meta = await sharp(served.bytes).metadata()
    expect(meta).toMatchObject({ format: 'webp', width: 2000, height: 800 })
    expect(meta.exif).toBeUndefined()
  })

  it('keeps an unused upload from collectors and visitors until a product shows it', async () => {
    const photo = (await upload(maker, 'photo', { name: 'draft.png', bytes: await pngOf(40, 30), type: 'image/png' })).body
    expect((await fetchFile(collector, photo.url)).status).toBe(404)
    expect((await fetchFile(null, photo.url)).status).toBe(404)
    expect((await fetchFile(shipper, photo.url)).status).toBe(404)
    expect((await fetchFile(maker, photo.url)).status).toBe(200)
    expect((await fetchFile(null, '/files/no-such-file-here')).status).toBe(404)

    const product = (await maker.post('/api/workshop/products', newProduct())).body
    const attached = await maker.request(`/api/workshop/products/${product.id}`, { method: 'PATCH', body: { photoFileIds: [photo.id], photoAlt: 'A test carton' } })
    expect(attached.status).toBe(200)
    const nowPublic = await fetchFile(collector, photo.url)
    expect(nowPublic.status).toBe(200)
    expect(nowPublic.headers.get('cache-control')).toMatch(/public/)
  })

  it('takes WAV samples by their bytes, serves byte ranges, and refuses an image on the audio route', async () => {
    const wav = encodeWav(makeToneSignal({ frequencyHz: 440, seconds: 0.5, sampleRate: 22_050, peakDbfs: -6 }), { sampleRate: 22_050 })
    const answer = await upload(maker, 'audio', { name: 'take 3.wav', bytes: wav, type: 'audio/wav' })
    expect(answer.status).toBe(201)
    expect(answer.body).toMatchObject({ mime: 'audio/wav', bytes: wav.byteLength })

    const part = await fetchFile(maker, answer.body.url, { range: 'bytes=0-99' })
    expect(part.status).toBe(206)
    expect(part.headers.get('content-range')).toBe(`bytes 0-99/${wav.byteLength}`)
    expect(part.bytes).toEqual(wav.subarray(0, 100))
    const tail = await fetchFile(maker, answer.body.url, { range: 'bytes=-10' })
    expect(tail.bytes).toEqual(wav.subarray(wav.byteLength - 10))
    expect((await fetchFile(maker, answer.body.url, { range: `bytes=${wav.byteLength + 5}-` })).status).toBe(416)
    expect((await fetchFile(maker, answer.body.url)).headers.get('accept-ranges')).toBe('bytes')

    const before = await stored()
    const image = await upload(maker, 'audio', { name: 'cover.wav', bytes: await pngOf(10, 10), type: 'audio/wav' })
    expect(image.status).toBe(415)
    expect(image.body.message).toMatch(/WAV, MP3 or Ogg/)
    expect(await stored()).toEqual(before)

    const product = (await maker.post('/api/workshop/products', newProduct())).body
    const wrongSlot = await maker.request(`/api/workshop/products/${product.id}`, { method: 'PATCH', body: { photoFileIds: [answer.body.id], photoAlt: 'x' } })
    expect(wrongSlot.status).toBe(400)
    expect(wrongSlot.body.data.fields.photoFileIds).toMatch(/no uploaded photo/)
    const sample = await maker.request(`/api/workshop/products/${product.id}`, { method: 'PATCH', body: { sampleFileId: answer.body.id } })
    expect(sample.status).toBe(200)
    expect(sample.body.sampleFileId).toBe(answer.body.id)
  })
})
