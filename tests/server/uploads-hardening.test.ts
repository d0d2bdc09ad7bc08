// Uploads: one set of rules for every route that takes a file (photos, audio samples, surface tests,
// the analysis page, test cuts, a ticket's cut): a path in the file name, an empty file or a control
// character in a text field is a 400 naming the field, and an audio sample must play to its end.
// A hidden product's photos and sample are the maker's alone.
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { encodeWav, makeSurfaceWav, makeToneSignal } from '../../server/audio/synth'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-hardening-uploads-'))
await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let collector: Client
let shipper: Client
let recorderId: number
let shavedCode: string
let ticketId: number

interface Sent { status: number, body: any }

/** A multipart request as a browser sends it (the client's cookie, this site's Origin). */
async function send(client: Client, path: string, file: { name: string, bytes: Uint8Array } | null, fields: Record<string, string> = {}): Promise<Sent> {
  const form = new FormData()
  for (const [name, value] of Object.entries(fields)) form.append(name, value)
  if (file) form.append('file', new Blob([file.bytes], { type: 'application/octet-stream' }), file.name)
  const target = url(path)
  const headers: Record<string, string> = { origin: new URL(target).origin, accept: 'application/json' }
  if (client.cookies.size) headers.cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(target, { method: 'POST', body: form, headers })
  const text = await response.text()
  let body: any = text
  try {
    body = JSON.parse(text)
  }
  catch { /* not JSON */ }
  return { status: response.status, body }
}

async function fetchFile(client: Client | null, path: string) {
  const headers: Record<string, string> = {}
  if (client?.cookies.size) headers.cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(url(path), { headers })
  await response.arrayBuffer()
  return { status: response.status, headers: response.headers }
}

/** Rows in `files` (through the maker's API) and files in the storage folder. */
async function stored() {
  const rows = await maker.get('/api/workshop/uploads')
  expect(rows.status).toBe(200)
  return { rows: rows.body.length as number, onDisk: readdirSync(uploadsDir, { recursive: true }).length }
}

function expectRefusal(answer: Sent, field: string, what: string, message?: RegExp) {
  expect(answer.status, `${what}: ${JSON.stringify(answer.body)}`).toBe(400)
  expect(answer.body.data?.fields, what).toHaveProperty(field)
  if (message) expect(`${answer.body.data.fields[field]} ${answer.body.message}`, what).toMatch(message)
}

// ——— files ———

const png = () => sharp({ create: { width: 48, height: 32, channels: 3, background: { r: 120, g: 40, b: 30 } } }).png().toBuffer()
const toneWav = (seconds = 0.5) => encodeWav(makeToneSignal({ frequencyHz: 440, seconds, sampleRate: 22_050, peakDbfs: -6 }), { sampleRate: 22_050 })
// Six seconds of a quiet synthetic surface: more than the ten turns at 160 rpm the analysis needs.
const surfaceWav = (seed = 5) => makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed })

/** MPEG-1 Layer III frames, 128 kbit/s at 44.1 kHz: a 4-byte header and 413 bytes of (silent) frame data. */
function mp3Frames(count: number): Uint8Array {
  const frame = Buffer.alloc(417)
  frame.set([0xff, 0xfb, 0x90, 0x44])
  return Buffer.concat(Array.from({ length: count }, () => frame))
}

const html = Buffer.from('<!doctype html><html><body><script>alert(document.cookie)</script></body></html>')

/** The WAV as written by the encoder, with its RIFF and data sizes rewritten. */
function withSizes(wav: Uint8Array, riffSize: number, dataSize: number): Uint8Array {
  const copy = Buffer.from(wav)
  const dataAt = copy.indexOf('data', 12, 'latin1')
  copy.writeUInt32LE(riffSize >>> 0, 4)
  copy.writeUInt32LE(dataSize >>> 0, dataAt + 4)
  return copy
}

beforeAll(async () => {
  expect((await new Client().get('/api/health')).status).toBe(200)
  maker = await signedIn(account('maker').email, account('maker').password)
  collector = await signedIn(account('collector').email, account('collector').password)
  shipper = await signedIn(account('shipper').email, account('shipper').password)

  const recorder = await maker.post('/api/workshop/recorders', { name: 'Hardening Lathe', stylus: 'sapphire' })
  expect(recorder.status, JSON.stringify(recorder.body)).toBe(201)
  recorderId = recorder.body.id

  const batch = await maker.post('/api/workshop/batches', { code: 'HD-26-01', formula: 'stearic acid 75 / paraffin 15 / carnauba 10', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075 })
  expect(batch.status, JSON.stringify(batch.body)).toBe(201)
  const blank = await maker.post('/api/workshop/blanks', { batchId: batch.body.id, format: 'two_minute', count: 1, diameterIn: '2.206' })
  expect(blank.status, JSON.stringify(blank.body)).toBe(201)
  shavedCode = blank.body.codes[0]
  expect((await maker.post(`/api/workshop/blanks/${shavedCode}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
  expect((await maker.post(`/api/workshop/blanks/${shavedCode}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)

  // A demo ticket whose tested blank waits for its cut.
  const board = await maker.get('/api/workshop/tickets?stage=blank_assigned')
  expect(board.status).toBe(200)
  expect(board.body.tickets.length).toBeGreaterThan(0)
  ticketId = board.body.tickets[0].id
})

afterAll(() => rmSync(uploadsDir, { recursive: true, force: true }))

/** Every route that takes a file, with text fields it would otherwise accept and a file it would take. */
const routes = () => [
  { name: 'photo', path: '/api/workshop/uploads/photo', fields: {} as Record<string, string>, good: async () => ({ name: 'carton.png', bytes: await png() }) },
  { name: 'audio sample', path: '/api/workshop/uploads/audio', fields: {}, good: async () => ({ name: 'sample.wav', bytes: toneWav() }) },
  { name: 'analysis', path: '/api/workshop/surface-tests/analyse', fields: { rpm: '160' }, good: async () => ({ name: 'take.wav', bytes: surfaceWav() }) },
  { name: 'surface test', path: `/api/workshop/blanks/${shavedCode}/surface-tests`, fields: { rpm: '160', listeningNotes: 'Quiet.' }, good: async () => ({ name: 'play-through.wav', bytes: surfaceWav() }) },
  { name: 'test cut', path: '/api/workshop/test-cuts', fields: { recorderId: String(recorderId), notes: 'A test.' }, good: async () => ({ name: 'cut.wav', bytes: surfaceWav(6) }) },
  { name: 'ticket cut', path: `/api/workshop/tickets/${ticketId}/cut`, fields: { recorderId: String(recorderId), notes: 'Cut.' }, good: async () => ({ name: 'cut.wav', bytes: surfaceWav(7) }) },
]

describe('one rule for every upload', () => {
  it('a file name with a path in it is refused with 400 naming file, on every route, and nothing is written', async () => {
    const before = await stored()
    const evilBefore = existsSync('/tmp/evil')
    for (const route of routes()) {
      const { bytes } = await route.good()
      for (const name of ['../../../../tmp/evil', 'sub/evil.wav', '..\\..\\evil.wav', '..']) {
        expectRefusal(await send(maker, route.path, { name, bytes }, route.fields), 'file', `${route.name} named ${name}`, /path/)
      }
    }
    expect(await stored()).toEqual(before)
    expect(readdirSync(uploadsDir, { recursive: true }).some(name => String(name).includes('evil'))).toBe(false)
    expect(existsSync('/tmp/evil')).toBe(evilBefore)
  })

  it('a 0-byte file is refused with 400 naming file, on every route (the ticket\'s cut too: no silent 200)', async () => {
    const before = await stored()
    for (const route of routes()) {
      expectRefusal(await send(maker, route.path, { name: 'empty.wav', bytes: new Uint8Array(0) }, route.fields), 'file', `${route.name} empty`, /empty|0 bytes/)
    }
    expect(await stored()).toEqual(before)
    expect((await maker.get(`/api/workshop/tickets/${ticketId}`)).body.stage).toBe('blank_assigned')
  })

  it('a text field holding a control character is refused with 400 naming that field, before its schema reads it', async () => {
    const before = await stored()
    for (const route of routes()) {
      const file = await route.good()
      expectRefusal(await send(maker, route.path, file, { ...route.fields, notes: 'before\u0000after' }), 'notes', `${route.name} notes with NUL`, /control character/)
    }
    const file = await routes()[3]!.good()
    expectRefusal(await send(maker, `/api/workshop/blanks/${shavedCode}/surface-tests`, file, { rpm: '160', listeningNotes: 'hiss\u001b[31m' }), 'listeningNotes', 'listening notes with ESC')
    expectRefusal(await send(maker, '/api/workshop/test-cuts', file, { recorderId: '\u0007' }), 'recorderId', 'recorder id with BEL')
    expect(await stored()).toEqual(before)
  })

  it('good uploads are still taken on every route, line breaks and tabs in notes included', async () => {
    for (const route of routes()) {
      const fields = 'notes' in route.fields ? { ...route.fields, notes: 'First line\r\nsecond\tline' } : route.fields
      const answer = await send(maker, route.path, await route.good(), fields)
      expect(answer.status, `${route.name}: ${JSON.stringify(answer.body)}`).toBeLessThan(300)
    }
    const ticket = await maker.get(`/api/workshop/tickets/${ticketId}`)
    expect(ticket.body.stage).toBe('cut')
    expect(ticket.body.cutTestId).not.toBeNull()
  })
})

describe('an audio sample must play to its end', () => {
  it('refuses truncated, header-only, 4 GB-claiming WAVs and sync bytes in front of HTML with 400 naming file; stores none', async () => {
    const wav = toneWav(1)
    const dataAt = Buffer.from(wav).indexOf('data', 12, 'latin1')
    const headerOnly = wav.subarray(0, dataAt + 8)
    const bad: [string, Uint8Array][] = [
      ['a WAV cut in half', wav.subarray(0, Math.floor(wav.byteLength / 2))],
      ['a WAV missing its last byte', wav.subarray(0, wav.byteLength - 1)],
      ['a header-only WAV', headerOnly],
      ['a header-only WAV that says so', withSizes(headerOnly, headerOnly.byteLength - 8, 0)],
      ['the RIFF header alone', wav.subarray(0, 12)],
      ['a WAV claiming 4 GB', withSizes(wav, 0xffffffff, 0xffffffff - dataAt)],
      ['a WAV whose RIFF size claims 4 GB', withSizes(wav, 0xffffffff, wav.byteLength - dataAt - 8)],
      ['MP3 sync bytes + HTML', Buffer.concat([Buffer.from([0xff, 0xfb]), html])],
      ['an MP3 frame header + HTML', Buffer.concat([Buffer.from([0xff, 0xfb, 0x90, 0x44]), html])],
      ['a whole MP3 frame + HTML', Buffer.concat([mp3Frames(1), html])],
      ['MP3 frames cut short', mp3Frames(6).subarray(0, 417 * 5 + 100)],
      ['an ID3 tag + HTML', Buffer.concat([Buffer.from([0x49, 0x44, 0x33, 3, 0, 0, 0, 0, 0, 10]), Buffer.alloc(10), html])],
      ['Ogg capture pattern + HTML', Buffer.concat([Buffer.from('OggS\u0000', 'latin1'), html])],
    ]
    const before = await stored()
    for (const [what, bytes] of bad) {
      expectRefusal(await send(maker, '/api/workshop/uploads/audio', { name: 'sample.wav', bytes }), 'file', what, /Nothing was stored/)
    }
    expect(await stored()).toEqual(before)
  })

  it('takes a whole WAV and a whole MP3, and serves them as they were sent', async () => {
    const wav = await send(maker, '/api/workshop/uploads/audio', { name: 'sample.wav', bytes: toneWav(1) })
    expect(wav.status, JSON.stringify(wav.body)).toBe(201)
    expect(wav.body.mime).toBe('audio/wav')
    const mp3 = await send(maker, '/api/workshop/uploads/audio', { name: 'sample.mp3', bytes: mp3Frames(40) })
    expect(mp3.status, JSON.stringify(mp3.body)).toBe(201)
    expect(mp3.body).toMatchObject({ mime: 'audio/mpeg', bytes: 417 * 40 })
    const served = await fetchFile(maker, mp3.body.url)
    expect(served.status).toBe(200)
    expect(served.headers.get('content-type')).toBe('audio/mpeg')
  })
})

describe('a hidden product\'s photos and sample', () => {
  it('the demo\'s hidden cylinder: 404 to visitors, collectors and shippers, 200 to the maker', async () => {
    for (const id of ['demo1-whistling-study-no-3-photo-1', 'demo1-whistling-study-no-3-sample']) {
      expect((await fetchFile(null, `/files/${id}`)).status, `${id} visitor`).toBe(404)
      expect((await fetchFile(collector, `/files/${id}`)).status, `${id} collector`).toBe(404)
      expect((await fetchFile(shipper, `/files/${id}`)).status, `${id} shipper`).toBe(404)
      const mine = await fetchFile(maker, `/files/${id}`)
      expect(mine.status, `${id} maker`).toBe(200)
      expect(mine.headers.get('cache-control')).toMatch(/private/)
    }
  })

  it('shown while the product is in the shop, gone the moment it is hidden, back when it is shown again', async () => {
    const photo = await send(maker, '/api/workshop/uploads/photo', { name: 'carton.png', bytes: await png() })
    const sample = await send(maker, '/api/workshop/uploads/audio', { name: 'sample.wav', bytes: toneWav() })
    expect(photo.status).toBe(201)
    expect(sample.status).toBe(201)
    const product = await maker.post('/api/workshop/products', {
      slug: `hidden-files-${Date.now()}`, title: 'Hidden Files Hornpipe', kind: 'recorded', format: 'two_minute', rpm: 160,
      material: 'Stearic acid wax (hard, black)', priceMinor: 3000, stock: 3, performer: 'The Test Quartet', runningTimeS: 100,
      description: 'A test cylinder.', photoFileIds: [photo.body.id], photoAlt: 'A red carton', sampleFileId: sample.body.id,
    })
    expect(product.status, JSON.stringify(product.body)).toBe(201)
    const urls = [photo.body.url as string, sample.body.url as string]
    for (const path of urls) {
      const shown = await fetchFile(null, path)
      expect(shown.status, `${path} shown`).toBe(200)
      // Caches must ask again before each use, so hiding takes effect at once.
      expect(shown.headers.get('cache-control')).toBe('public, no-cache')
    }

    const hide = await maker.request(`/api/workshop/products/${product.body.id}`, { method: 'PATCH', body: { hidden: true } })
    expect(hide.status, JSON.stringify(hide.body)).toBe(200)
    for (const path of urls) {
      expect((await fetchFile(null, path)).status, `${path} visitor`).toBe(404)
      expect((await fetchFile(collector, path)).status, `${path} collector`).toBe(404)
      expect((await fetchFile(maker, path)).status, `${path} maker`).toBe(200)
    }
    // A cache asking again with the tag it kept gets no 304 either.
    const revalidated = await fetch(url(urls[0]!), { headers: { 'if-none-match': `"${photo.body.id}"` } })
    expect(revalidated.status).toBe(404)

    const show = await maker.request(`/api/workshop/products/${product.body.id}`, { method: 'PATCH', body: { hidden: false } })
    expect(show.status).toBe(200)
    for (const path of urls) expect((await fetchFile(collector, path)).status, `${path} shown again`).toBe(200)
  })
})
