import { mkdtempSync, readdirSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { encodeWav, makeSurfaceWav, makeToneSignal } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { askPaymentFake, Client, postMultipart, signedIn, useTestServer, waitFor, workshopBench } from './harness'

const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-custom-uploads-'))
const env = await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })
const payments = env.payments

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let collector: Client
let otherCollector: Client
let shipper: Client
let batchId: number
let recorderId: number
let counter = 0

const address = { name: 'Perrin Aldwick', line1: '9 Spindle Row', city: 'Lowmere', postalCode: 'LM5 2SR', region: 'OR', country: 'US' }
const DAY = 86_400_000
const dateIn = (days: number) => new Date(Date.now() + days * DAY).toISOString().slice(0, 10)
const words = (count: number) => Array.from({ length: count }, () => 'word').join(' ')

beforeAll(async () => {
  expect((await new Client().get('/api/health')).status).toBe(200)
  ;({ maker, batchId, recorderId } = await workshopBench({ batchCode: 'CM-26-01', formula: 'stearic acid 75 / paraffin 15 / carnauba 10', recorderName: 'Message Lathe', horn: 'aluminium, 24 in' }))
  collector = await signedIn(account('collector').email, account('collector').password)
  shipper = await signedIn(account('shipper').email, account('shipper').password)
  otherCollector = new Client()
  const registered = await otherCollector.post('/api/auth/register', { email: 'wren.halloway@collectors.test', name: 'Wren Halloway', password: 'a-long-enough-password-26' })
  expect(registered.status, JSON.stringify(registered.body)).toBeLessThan(300)
})

// ——— helpers ———

const fake = (path: string, body?: unknown) => askPaymentFake(payments, path, body)

function upload(client: Client, path: string, file: { name: string, bytes: Uint8Array, type?: string } | null, fields: Record<string, string> = {}) {
  return postMultipart(client, path, file ? [{ field: 'file', name: file.name, bytes: file.bytes, type: file.type ?? 'audio/wav' }] : [], fields)
}

async function fetchAs(client: Client, path: string, headers: Record<string, string> = {}) {
  const response = await fetch(url(path), { headers: { cookie: [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; '), ...headers } })
  return { status: response.status, headers: response.headers, bytes: Buffer.from(await response.arrayBuffer()) }
}

const toneWav = (seconds: number) => encodeWav(makeToneSignal({ frequencyHz: 440, seconds, sampleRate: 22_050, peakDbfs: -12 }), { sampleRate: 22_050 })
const quietWav = (seed = 7) => makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed })

/** MPEG-1 Layer III frames, 128 kbit/s at 44.1 kHz: 417 bytes and 1152 samples (26.12 ms) each. */
function mp3Frames(count: number): Uint8Array {
  const frame = Buffer.alloc(417)
  frame.set([0xff, 0xfb, 0x90, 0x44])
  return Buffer.concat(Array.from({ length: count }, () => frame))
}

/** An Ogg page (RFC 3533), its CRC-32 (polynomial 0x04c11db7, not reflected) worked out here independently. */
function oggPage(flags: number, granule: bigint, sequence: number, body: Buffer): Buffer {
  const header = Buffer.alloc(27 + 1)
  header.write('OggS', 0, 'latin1')
  header[5] = flags
  header.writeBigInt64LE(granule, 6)
  header.writeUInt32LE(0x1234, 14)
  header.writeUInt32LE(sequence, 18)
  header[26] = 1
  header[27] = body.length
  const page = Buffer.concat([header, body])
  let crc = 0
  for (const byte of page) {
    crc ^= byte << 24
    for (let bit = 0; bit < 8; bit++) crc = (crc & 0x80000000) ? ((crc << 1) ^ 0x04c11db7) : (crc << 1)
    crc >>>= 0
  }
  page.writeUInt32LE(crc, 22)
  return page
}

/** A Vorbis-in-Ogg stream at 44.1 kHz whose last page ends at sample 132,300: 3.0 s. */
function oggVorbis(): Uint8Array {
  const ident = Buffer.alloc(30)
  ident.write('\x01vorbis', 0, 'latin1')
  ident[11] = 1
  ident.writeUInt32LE(44_100, 12)
  return Buffer.concat([oggPage(2, 0n, 0, ident), oggPage(0, 88_200n, 1, Buffer.alloc(50, 7)), oggPage(4, 132_300n, 2, Buffer.alloc(50, 9))])
}

const storedFiles = () => readdirSync(uploadsDir, { recursive: true }).length
const sessionCount = async () => (await fake('/_fake/sessions')).data.length as number
const orderCount = async () => (await maker.get('/api/workshop/orders')).body.total as number
const mails = () => env.fake.list()
const mailsTo = (to: string, subject: RegExp) => mails().filter(mail => mail.to.includes(to) && subject.test(mail.subject))

function message(extra: Record<string, unknown> = {}) {
  return { occasion: 'Birthday', recipientName: 'Ada Thornbury', script: 'Happy birthday, Ada! Many happy returns from all of us at Spindle Row.', voice: 'maker', format: 'two_minute', rush: false, wishedDate: dateIn(20), ...extra }
}

function checkoutBody(customMessages: unknown[], extra: Record<string, unknown> = {}) {
  return { customMessages, email: `buyer-${Date.now()}-${++counter}@collectors.test`, shippingAddress: address, zone: 'domestic', ...extra }
}

async function payFor(payUrl: string, orderNumber: string) {
  await fake(`/_fake/sessions/${payUrl.split('/').pop()}/complete?wait=true`, {})
  await waitFor(async () => (await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status === 'in_production', 10_000, 'production to start')
}

async function ticketOf(orderNumber: string) {
  const board = await maker.get(`/api/workshop/tickets?q=${orderNumber}`)
  expect(board.status).toBe(200)
  expect(board.body.tickets).toHaveLength(1)
  return board.body.tickets[0]
}

async function testedBlank(format: 'two_minute' | 'four_minute'): Promise<string> {
  const created = await maker.post('/api/workshop/blanks', { batchId, format, count: 1, diameterIn: '2.206' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const code = created.body.codes[0] as string
  expect((await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
  expect((await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)
  const tested = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: `${code}.wav`, bytes: quietWav(++counter) })
  expect(tested.status, JSON.stringify(tested.body)).toBe(201)
  return code
}

/** The maker assigns a fresh tested blank, records the cut and sends a proof; answers the proof's id. */
async function cutAndSendProof(ticketId: number, note = '') {
  const assigned = await maker.post(`/api/workshop/tickets/${ticketId}/assign`, { blankCode: await testedBlank('two_minute') })
  expect(assigned.status, JSON.stringify(assigned.body)).toBe(200)
  const cut = await maker.post(`/api/workshop/tickets/${ticketId}/cut`, { recorderId })
  expect(cut.status, JSON.stringify(cut.body)).toBe(200)
  const proof = await upload(maker, `/api/workshop/tickets/${ticketId}/proof`, { name: 'proof.wav', bytes: toneWav(2) }, note ? { note } : {})
  expect(proof.status, JSON.stringify(proof.body)).toBe(201)
  return proof.body.id as number
}

/** Read the inbox after several more passes of the mail loop, so a duplicate would be counted. */
const settleMail = () => new Promise(resolve => setTimeout(resolve, 1200))

// ——— quotes ———

describe('POST /api/custom/quote', () => {
  // Worked by hand in tests/unit/custom-quote.test.ts (150 words a minute, from memory; 4 s lead-in and
  // run-out; a 2-minute record holds 3.6 in × 100 ÷ 160 rpm = 135 s; $65 base for 60 s, $8 per started 30 s).
  it.each([
    [100, { words: 100, seconds: 48, capacitySeconds: 135, verdict: 'fits', wordsLeft: 217 }, 6500, true],
    [300, { words: 300, seconds: 128, capacitySeconds: 135, verdict: 'tight', wordsLeft: 17 }, 8100, true],
    [320, { words: 320, seconds: 136, capacitySeconds: 135, verdict: 'too_long', wordsLeft: -3 }, 8900, false],
  ])('%i words on a 2-minute record: the hand-worked fit and price', async (count, fit, total, canOrder) => {
    const answer = await new Client().post('/api/custom/quote', { script: words(count), format: 'two_minute', voice: 'maker', rush: false })
    expect(answer.status, JSON.stringify(answer.body)).toBe(200)
    expect(answer.body.fit).toEqual(fit)
    expect(answer.body.price.totalMinor).toBe(total)
    expect(answer.body.price.parts[0]).toEqual({ id: 'base', label: expect.any(String), amountMinor: 6500 })
    expect(answer.body.canOrder).toBe(canOrder)
    expect(answer.body.earliestDate).toBe(dateIn(10))
  })

  it('a date too early names the earliest; rush brings it to 4 days; a voice recording\'s seconds replace the script', async () => {
    const early = await new Client().post('/api/custom/quote', { script: 'Hello there', format: 'two_minute', voice: 'maker', rush: false, wishedDate: dateIn(5) })
    expect(early.body.canOrder).toBe(false)
    expect(early.body.reasons).toEqual([{ field: 'wishedDate', message: expect.stringContaining(dateIn(10)) }])
    const rush = await new Client().post('/api/custom/quote', { script: 'Hello there', format: 'two_minute', voice: 'maker', rush: true, wishedDate: dateIn(5) })
    expect(rush.body.canOrder).toBe(true)
    expect(rush.body.price.parts.map((part: any) => part.id)).toEqual(['base', 'rush'])
    const voice = await new Client().post('/api/custom/quote', { voiceSeconds: 95, format: 'two_minute', voice: 'upload', rush: false })
    expect(voice.body.fit.seconds).toBe(103)
    expect(voice.body.price.totalMinor).toBe(8100)
  })

  it('schema errors are 400 naming the field: a 20,000-word script, a bad format, a non-date', async () => {
    for (const [body, field] of [
      [{ script: words(20_000), format: 'two_minute', voice: 'maker', rush: false }, 'script'],
      [{ script: 'Hi', format: 'eight_minute', voice: 'maker', rush: false }, 'format'],
      [{ script: 'Hi', format: 'two_minute', voice: 'maker', rush: false, wishedDate: 'next Tuesday' }, 'wishedDate'],
      [{ script: 'Hi', format: 'two_minute', voice: 'telepathy', rush: false }, 'voice'],
    ] as const) {
      const answer = await new Client().post('/api/custom/quote', body)
      expect(answer.status, field).toBe(400)
      expect(answer.body.data.fields, field).toHaveProperty(field)
    }
  })
})

// ——— refusals at checkout ———

describe('checkout of personal messages: refusals store and charge nothing', () => {
  it.each([
    ['a script too long for the format', 'customMessages.0.script', { script: words(320) }],
    ['a date before the earliest', 'customMessages.0.wishedDate', { wishedDate: dateIn(3) }],
    ['a date in the past', 'customMessages.0.wishedDate', { wishedDate: dateIn(-2) }],
    ['an empty script for the maker to speak', 'customMessages.0.script', { script: '' }],
    ['a 20,000-word script', 'customMessages.0.script', { script: words(20_000) }],
    ['a recording that was never uploaded', 'customMessages.0.voiceUploadId', { voice: 'upload', voiceUploadId: 'abcdefghijklmnop' }],
  ])('%s → 400 naming %s; no order, no payment page', async (_what, field, change) => {
    const [orders, sessions] = [await orderCount(), await sessionCount()]
    const answer = await collector.post('/api/checkout', checkoutBody([message(change)]))
    expect(answer.status, JSON.stringify(answer.body)).toBe(400)
    expect(answer.body.data.fields).toHaveProperty(field)
    expect(await orderCount()).toBe(orders)
    expect(await sessionCount()).toBe(sessions)
  })

  it('an empty checkout (no items, no messages) is a 400', async () => {
    const answer = await collector.post('/api/checkout', checkoutBody([]))
    expect(answer.status).toBe(400)
    expect(answer.body.data.fields).toHaveProperty('items')
  })
})

// ——— voice recordings ———

describe('POST /api/custom/voice', () => {
  it('measures a WAV from its header, an MP3 by its frames and an Ogg by its last granule position', async () => {
    const wav = await upload(new Client(), '/api/custom/voice', { name: 'hello.wav', bytes: toneWav(3) })
    expect(wav.status, JSON.stringify(wav.body)).toBe(201)
    expect(wav.body).toMatchObject({ seconds: 3, mime: 'audio/wav' })
    // 100 frames × 1152 samples ÷ 44,100 Hz = 2.612 s (ISO/IEC 11172-3 frame sizes).
    const mp3 = await upload(collector, '/api/custom/voice', { name: 'hello.mp3', bytes: mp3Frames(100), type: 'audio/mpeg' })
    expect(mp3.status, JSON.stringify(mp3.body)).toBe(201)
    expect(mp3.body.seconds).toBeCloseTo(2.61, 2)
    // 132,300 ÷ 44,100 = 3.0 s (RFC 3533 granule position; Vorbis I identification header).
    const ogg = await upload(collector, '/api/custom/voice', { name: 'hello.ogg', bytes: oggVorbis(), type: 'audio/ogg' })
    expect(ogg.status, JSON.stringify(ogg.body)).toBe(201)
    expect(ogg.body).toMatchObject({ seconds: 3, mime: 'audio/ogg' })
  })

  it('a renamed executable is 415 naming file; a 31 MB file is 413 from its declared size; nothing is stored', async () => {
    const before = storedFiles()
    const elf = Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0]), Buffer.alloc(4000, 1)])
    const renamed = await upload(new Client(), '/api/custom/voice', { name: 'birthday.wav', bytes: elf })
    expect(renamed.status).toBe(415)
    expect(renamed.body.data.fields).toHaveProperty('file')
    const target = new URL(url('/api/custom/voice'))
    const status = await new Promise<number>((resolve, reject) => {
      const req = httpRequest({
        host: target.hostname, port: target.port, path: target.pathname, method: 'POST',
        headers: { 'origin': target.origin, 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(31 * 1024 * 1024) },
      }, (res) => {
        resolve(res.statusCode ?? 0)
        res.resume()
        req.destroy()
      })
      req.on('error', reject)
      req.write(Buffer.alloc(1024))
      setTimeout(() => reject(new Error('no answer before the body was complete')), 10_000)
    })
    expect(status).toBe(413)
    expect(storedFiles()).toBe(before)
  })

  it('a recording goes into one order only; its seconds price the message', async () => {
    const voice = await upload(collector, '/api/custom/voice', { name: 'ours.wav', bytes: toneWav(4) })
    expect(voice.status).toBe(201)
    const first = await collector.post('/api/checkout', checkoutBody([message({ voice: 'upload', voiceUploadId: voice.body.id, script: '' })]))
    expect(first.status, JSON.stringify(first.body)).toBe(201)
    const view = await collector.get(`/api/orders/${first.body.orderNumber}`)
    expect(view.body.messages[0]).toMatchObject({ voice: 'upload', occasion: 'Birthday' })
    // 4 s of voice: the base price; shipping of one cylinder to the domestic zone ($12.00).
    expect(view.body.items[0]).toMatchObject({ kind: 'custom', title: 'Personal message — Birthday for Ada Thornbury', unitPriceMinor: 6500, madeToOrder: true })
    expect(view.body.totalMinor).toBe(6500 + 1200)
    const again = await collector.post('/api/checkout', checkoutBody([message({ voice: 'upload', voiceUploadId: voice.body.id, script: '' })]))
    expect(again.status).toBe(400)
    expect(again.body.data.fields['customMessages.0.voiceUploadId']).toMatch(new RegExp(first.body.orderNumber))
    // Another customer cannot use it at all.
    const stolen = await otherCollector.post('/api/checkout', checkoutBody([message({ voice: 'upload', voiceUploadId: voice.body.id, script: '' })]))
    expect(stolen.status).toBe(400)
    expect(stolen.body.data.fields).toHaveProperty('customMessages.0.voiceUploadId')
  })
})

// ——— the whole flow ———

describe('a personal message from checkout to approval', () => {
  it('collector orders, pays, maker cuts and sends proofs, collector asks for a re-cut and approves; each mail once', async () => {
    const wished = dateIn(20)
    const body = checkoutBody([message({ wishedDate: wished, notes: 'Please say "Ada" slowly.' })], { email: account('collector').email })
    const created = await collector.post('/api/checkout', body)
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    const { orderNumber, url: payUrl } = created.body
    await payFor(payUrl, orderNumber)

    const ticket = await ticketOf(orderNumber)
    expect(ticket).toMatchObject({ kind: 'custom', stage: 'queued', format: 'two_minute', dueDate: wished })
    expect(ticket.message).toMatchObject({ wishedDate: wished, fit: { verdict: 'fits' } })
    expect(ticket.wishes).toMatch(/Occasion: Birthday[\s\S]*For: Ada Thornbury[\s\S]*Please say "Ada" slowly/)
    const detail = await maker.get(`/api/workshop/tickets/${ticket.id}`)
    expect(detail.body.message).toMatchObject({ wishedDate: wished, fit: { verdict: 'fits' } })
    await waitFor(async () => mailsTo(account('collector').email, /personal message is in the workshop/).length > 0, 10_000, 'the order-received mail')
    // The wished-for date in the shop's locale (en-US by default): "Thursday, December 24, 2026".
    const wishedInMail = new Intl.DateTimeFormat('en-US', { dateStyle: 'full', timeZone: 'UTC' }).format(new Date(`${wished}T12:00:00Z`))
    expect(mailsTo(account('collector').email, /personal message is in the workshop/)[0]!.text.replace(/\s+/g, ' ')).toContain(wishedInMail)

    // A proof only after the cut.
    const early = await upload(maker, `/api/workshop/tickets/${ticket.id}/proof`, { name: 'proof.wav', bytes: toneWav(1) })
    expect(early.status).toBe(409)
    const proof1 = await cutAndSendProof(ticket.id, 'First take.')
    expect((await ticketOf(orderNumber)).stage).toBe('proof_sent')
    expect((await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status).toBe('proof_pending')

    const cue = await maker.get(`/api/workshop/tickets/${ticket.id}/cue-sheet`)
    expect(cue.status).toBe(200)
    expect(cue.body).toMatchObject({ format: 'two_minute', rpm: 160, wordsPerMinute: 150, occasion: 'Birthday', recipientName: 'Ada Thornbury', wishedDate: wished, voice: 'maker', voiceUrl: null })
    expect(cue.body.words[0]).toBe('Happy')
    expect(cue.body.recorder).toMatchObject({ id: expect.any(Number), name: expect.any(String) })

    // The collector hears it: the whole file, and a part of it.
    const view = await collector.get(`/api/orders/${orderNumber}`)
    const shown = view.body.messages[0]
    expect(shown).toMatchObject({ occasion: 'Birthday', recipientName: 'Ada Thornbury', voice: 'maker', format: 'two_minute', rush: false, wishedDate: wished, recutsUsed: 0, freeRecutsLeft: 1 })
    expect(shown.scriptStart).toBe('Happy birthday, Ada! Many happy returns from all of us at Spindle …')
    expect(shown.proofs).toEqual([expect.objectContaining({ id: proof1, note: 'First take.', answer: 'waiting', audioUrl: `/api/orders/${orderNumber}/proofs/${proof1}/audio` })])
    const audio = await fetchAs(collector, shown.proofs[0].audioUrl)
    expect(audio.status).toBe(200)
    expect(audio.headers.get('content-type')).toBe('audio/wav')
    expect(audio.bytes.equals(Buffer.from(toneWav(2)))).toBe(true)
    const part = await fetchAs(collector, shown.proofs[0].audioUrl, { range: 'bytes=0-99' })
    expect(part.status).toBe(206)
    expect(part.bytes).toHaveLength(100)
    expect(part.bytes.subarray(0, 4).toString('latin1')).toBe('RIFF')

    // Nobody else sees the order, the proof or its file.
    for (const [who, client] of [['another collector', otherCollector], ['the shipper', shipper], ['a visitor', new Client()]] as const) {
      expect((await client.get(`/api/orders/${orderNumber}`)).status, who).toBe(404)
      expect((await fetchAs(client, shown.proofs[0].audioUrl)).status, who).toBe(404)
      expect((await client.post(`/api/orders/${orderNumber}/proofs/${proof1}/approve`, {})).status, who).toBe(404)
      expect((await client.post(`/api/orders/${orderNumber}/proofs/${proof1}/recut`, { note: 'louder' })).status, who).toBe(404)
    }
    expect((await collector.get(`/api/orders/${orderNumber}/proofs/999999/audio`)).status).toBe(404)

    // A re-cut with a note; the proof is answered once.
    expect((await collector.post(`/api/orders/${orderNumber}/proofs/${proof1}/recut`, { note: '' })).status).toBe(400)
    const recut = await collector.post(`/api/orders/${orderNumber}/proofs/${proof1}/recut`, { note: 'A little slower on the name, please.' })
    expect(recut.status, JSON.stringify(recut.body)).toBe(200)
    expect(recut.body).toMatchObject({ answer: 'recut', paidRecut: false })
    expect((await collector.post(`/api/orders/${orderNumber}/proofs/${proof1}/approve`, {})).status).toBe(409)
    expect((await collector.post(`/api/orders/${orderNumber}/proofs/${proof1}/recut`, { note: 'again' })).status).toBe(409)
    const back = await ticketOf(orderNumber)
    expect(back).toMatchObject({ stage: 'blank_assigned', recuts: 1, lastRecutNote: 'A little slower on the name, please.' })
    expect((await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status).toBe('in_production')

    // The second proof: the free re-cut is used up.
    const proof2 = await cutAndSendProof(ticket.id)
    const limit = await collector.post(`/api/orders/${orderNumber}/proofs/${proof2}/recut`, { note: 'Once more?' })
    expect(limit.status).toBe(402)
    expect(limit.body.message).toBe('You have used your free re-cut; a further re-cut costs $25.00.')
    expect(limit.body.data.paidRecutMinor).toBe(2500)
    // A double click: both requests arrive at once, one approves and the other is told it is answered.
    const both = await Promise.all([1, 2].map(() => collector.post(`/api/orders/${orderNumber}/proofs/${proof2}/approve`, {})))
    expect(both.map(answer => answer.status).sort()).toEqual([200, 409])
    expect((await ticketOf(orderNumber)).stage).toBe('approved')
    expect((await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status).toBe('in_production')
    const final = (await collector.get(`/api/orders/${orderNumber}`)).body.messages[0]
    expect(final).toMatchObject({ recutsUsed: 1, freeRecutsLeft: 0 })
    expect(final.proofs.map((p: any) => [p.id, p.answer])).toEqual([[proof1, 'recut'], [proof2, 'approved']])

    // Each mail exactly once, by subject and recipient.
    await settleMail()
    const customer = account('collector').email
    const makerEmail = account('maker').email
    expect(mailsTo(customer, new RegExp(`^Order ${orderNumber} is paid`))).toHaveLength(1)
    expect(mailsTo(customer, new RegExp(`personal message is in the workshop — order ${orderNumber}$`))).toHaveLength(1)
    expect(mailsTo(customer, new RegExp(`proof of your message is ready to hear — order ${orderNumber}$`))).toHaveLength(2)
    expect(mailsTo(customer, new RegExp(`You approved the proof — order ${orderNumber}$`))).toHaveLength(1)
    expect(mailsTo(makerEmail, new RegExp(`^Re-cut asked for — order ${orderNumber}$`))).toHaveLength(1)
    expect(mailsTo(makerEmail, new RegExp(`^Proof approved — order ${orderNumber}$`))).toHaveLength(1)
    expect(mailsTo(makerEmail, new RegExp(`^Re-cut asked for — order ${orderNumber}$`))[0]!.text).toContain('A little slower on the name')
  })

  it('a guest answers through the signed link; a re-cut past the free one is paid on its own payment page and made when the payment is confirmed; the maker approves only with a reason', async () => {
    const guest = new Client()
    const created = await guest.post('/api/checkout', checkoutBody([message({ rush: true, wishedDate: dateIn(5), occasion: 'Anniversary' })]))
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    const { orderNumber, url: payUrl, accessToken } = created.body
    await payFor(payUrl, orderNumber)
    const ticket = await ticketOf(orderNumber)
    // Rush: due on the wished-for date (5 days), after the 4-day rush lead time.
    expect(ticket.dueDate).toBe(dateIn(5))

    const proof1 = await cutAndSendProof(ticket.id)
    expect((await guest.get(`/api/orders/${orderNumber}`)).status).toBe(404)
    const view = await guest.get(`/api/orders/${orderNumber}?t=${accessToken}`)
    const audioUrl = view.body.messages[0].proofs[0].audioUrl as string
    expect(audioUrl).toBe(`/api/orders/${orderNumber}/proofs/${proof1}/audio?t=${accessToken}`)
    expect((await fetchAs(guest, audioUrl)).status).toBe(200)
    expect((await fetchAs(guest, audioUrl.replace(/t=.*/, 't=not-the-token'))).status).toBe(404)
    expect((await guest.post(`/api/orders/${orderNumber}/proofs/${proof1}/recut`, { note: 'Softer.' })).status).toBe(404)
    expect((await guest.post(`/api/orders/${orderNumber}/proofs/${proof1}/recut`, { note: 'Softer.', t: accessToken })).status).toBe(200)

    const proof2 = await cutAndSendProof(ticket.id)
    const unpaid = await guest.post(`/api/orders/${orderNumber}/proofs/${proof2}/recut?t=${accessToken}`, { note: 'Add "with love".' })
    expect(unpaid.status).toBe(402)
    // Agreeing to the price opens a payment page for the fee; nothing changes until it is paid.
    const paid = await guest.post(`/api/orders/${orderNumber}/proofs/${proof2}/recut?t=${accessToken}`, { note: 'Add "with love".', pay: true })
    expect(paid.status, JSON.stringify(paid.body)).toBe(200)
    expect(paid.body).toMatchObject({ answer: 'waiting', paidRecutMinor: 2500, url: expect.any(String) })
    const session = await fake(`/_fake/sessions`).then(all => all.data.find((row: any) => paid.body.url.endsWith(row.id)))
    expect(session).toMatchObject({ amount_total: 2500, metadata: { purpose: 'paid_recut', proof_id: String(proof2) } })
    expect((await ticketOf(orderNumber)).stage).toBe('proof_sent')
    await fake(`/_fake/sessions/${paid.body.url.split('/').pop()}/complete?wait=true`, {})
    await waitFor(async () => (await ticketOf(orderNumber)).stage === 'blank_assigned', 10_000, 'the paid re-cut')
    const recutShown = (await guest.get(`/api/orders/${orderNumber}?t=${accessToken}`)).body.messages[0].proofs
    expect(recutShown.map((p: any) => [p.id, p.answer, p.answerNote])).toEqual([[proof1, 'recut', 'Softer.'], [proof2, 'recut', 'Add "with love".']])
    // The order itself is untouched by the fee: still its own total, in production.
    expect((await guest.get(`/api/orders/${orderNumber}?t=${accessToken}`)).body).toMatchObject({ status: 'in_production', totalMinor: view.body.totalMinor, refundedMinor: 0 })
    await waitFor(async () => mailsTo(account('maker').email, new RegExp(`^Re-cut asked for — order ${orderNumber}$`)).length >= 2, 10_000, 'the second re-cut mail')
    expect(mailsTo(account('maker').email, new RegExp(`^Re-cut asked for — order ${orderNumber}$`)).map(m => m.text).join('\n')).toMatch(/has paid \$25\.00/)

    const proof3 = await cutAndSendProof(ticket.id)
    const silent = await maker.post(`/api/workshop/tickets/${ticket.id}/stage`, { to: 'approved' })
    expect(silent.status).toBe(400)
    expect(silent.body.data.fields).toHaveProperty('note')
    expect((await maker.post(`/api/orders/${orderNumber}/proofs/${proof3}/approve`, {})).status).toBe(403)
    const byPhone = await maker.post(`/api/workshop/tickets/${ticket.id}/stage`, { to: 'approved', note: 'Approved by telephone on Tuesday.' })
    expect(byPhone.status, JSON.stringify(byPhone.body)).toBe(200)
    const after = (await guest.get(`/api/orders/${orderNumber}?t=${accessToken}`)).body.messages[0]
    expect(after.proofs.at(-1)).toMatchObject({ id: proof3, answer: 'approved', answerNote: 'Approved by telephone on Tuesday.' })
    expect((await guest.post(`/api/orders/${orderNumber}/proofs/${proof3}/approve?t=${accessToken}`, {})).status).toBe(409)
    expect(after.recutsUsed).toBe(2)
  })

  it('the cart page\'s quote prices messages beside cylinders; a cart of messages only (items: []) quotes and checks out', async () => {
    const quote = await new Client().post('/api/cart/quote', { items: [], customMessages: [message({ format: 'four_minute' })], zone: 'domestic' })
    expect(quote.status, JSON.stringify(quote.body)).toBe(200)
    expect(quote.body.messageLines).toEqual([expect.objectContaining({ kind: 'custom', title: 'Personal message — Birthday for Ada Thornbury', unitPriceMinor: 6500 + 1500 })])
    expect(quote.body.subtotalMinor).toBe(8000)
    expect(quote.body.totalMinor).toBe(8000 + 1200)
    const refused = await new Client().post('/api/cart/quote', { items: [], customMessages: [message({ wishedDate: dateIn(1) })] })
    expect(refused.status).toBe(400)
    expect(refused.body.data.fields).toHaveProperty('customMessages.0.wishedDate')
    expect((await new Client().post('/api/cart/quote', { items: [] })).status).toBe(400)
    const created = await collector.post('/api/checkout', { ...checkoutBody([message()]), items: [] })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
  })

  it('the demo holds a message at its cut: its cue sheet and the proof form can be tried', async () => {
    const board = await maker.get('/api/workshop/tickets?stage=cut')
    const demo = (board.body.tickets as any[]).find(ticket => ticket.kind === 'custom' && ticket.message)
    expect(demo, 'a demo message ticket at stage cut').toBeDefined()
    const cue = await maker.get(`/api/workshop/tickets/${demo.id}/cue-sheet`)
    expect(cue.status).toBe(200)
    expect(cue.body).toMatchObject({ occasion: 'Retirement', voice: 'maker', blankCode: expect.any(String) })
    // 78 words at 150 a minute (0.4 s each, from memory) is 31.2 s of speech: marks at 15 s (word 38) and 30 s (word 76).
    expect(cue.body.marks).toEqual([{ second: 15, wordIndex: 37 }, { second: 30, wordIndex: 75 }])
    const mine = await collector.get(`/api/orders/${demo.orderNumber}`)
    expect(mine.body.messages[0]).toMatchObject({ occasion: 'Retirement', proofs: [] })
  })

  it('a message and a cylinder check out together: one parcel, shipping for two cylinders', async () => {
    const answer = await collector.post('/api/checkout', { ...checkoutBody([message()]), items: [{ slug: 'plain-blank-2-minute-stearic-acid', qty: 1 }] })
    expect(answer.status, JSON.stringify(answer.body)).toBe(201)
    const view = (await collector.get(`/api/orders/${answer.body.orderNumber}`)).body
    expect(view.items.map((item: any) => item.kind).sort()).toEqual(['blank', 'custom'])
    expect(view.shippingMinor).toBe(1200)
    expect(view.subtotalMinor).toBe(6500 + view.items.find((item: any) => item.kind === 'blank').lineTotalMinor)
  })
})
