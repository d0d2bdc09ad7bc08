import { execFileSync } from 'node:child_process'
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer, waitFor } from './harness'

/*
 * The packing slip and the address label, read back the way a scanner and a person read them: each
 * PDF is rasterised at 200 dpi with poppler's pdftoppm and its codes decoded with zbarimg (Debian's
 * poppler-utils and zbar-tools, the reference tools here), its words taken out with pdftotext, and its
 * page size and word boxes with pdfinfo and pdftotext -bbox.
 */

const siteUrl = 'http://localhost:3000'
const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-slip-uploads-'))
const env = await useTestServer({ NUXT_SITE_URL: siteUrl, NUXT_UPLOADS_DIR: uploadsDir })

const account = (role: string) => demoAccounts.find(a => a.role === role)!
const work = mkdtempSync(join(tmpdir(), 'gw-slip-'))
let maker: Client
let shipper: Client
let collector: Client
let orderNumber: string
let shipToName: string
let certificates: { ticketId: number, blankCode: string }[]

/** GET as a client, body as bytes (the harness's client reads text, which would spoil a PDF). */
async function fetchBytes(client: Client | null, path: string) {
  const headers: Record<string, string> = {}
  if (client?.cookies.size) headers.cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const send = () => fetch(url(path), { headers })
  // A kept-alive connection the server closed for idleness just as it was reused: sent once more (as the harness's client does).
  const response = await send().catch((error: { cause?: { code?: string } }) => {
    if (error?.cause?.code === 'UND_ERR_SOCKET') return send()
    throw error
  })
  return { status: response.status, type: response.headers.get('content-type') ?? '', disposition: response.headers.get('content-disposition') ?? '', bytes: Buffer.from(await response.arrayBuffer()) }
}

function run(command: string, args: string[]): string {
  return execFileSync(command, args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] })
}

interface ReadPdf { codes: string[], text: string, pageSizes: string[], words: { page: { width: number, height: number }, x0: number, y0: number, x1: number, y1: number, word: string }[] }

/** Everything a reader gets from the PDF: decoded codes (every page at 200 dpi), text, page sizes, word boxes. */
function readPdf(name: string, bytes: Buffer): ReadPdf {
  const file = join(work, `${name}.pdf`)
  writeFileSync(file, bytes)
  run('pdftoppm', ['-r', '200', '-png', file, join(work, name)])
  const pngs = readdirSync(work).filter(entry => entry.startsWith(`${name}-`) && entry.endsWith('.png')).sort()
  const codes = pngs.flatMap((png) => {
    try {
      return run('zbarimg', ['--raw', '-q', join(work, png)]).split('\n').map(line => line.trim()).filter(Boolean)
    }
    catch {
      return [] // zbarimg exits 4 when a page holds no code
    }
  })
  const text = run('pdftotext', ['-layout', file, '-'])
  const info = run('pdfinfo', ['-f', '1', '-l', '99', file])
  const pageSizes = [...info.matchAll(/Page\s+\d+ size:\s+([\d.]+ x [\d.]+) pts/g)].map(match => match[1]!)
  const bbox = run('pdftotext', ['-bbox', file, '-'])
  const words: ReadPdf['words'] = []
  for (const page of bbox.split('<page ').slice(1)) {
    const [, width, height] = /width="([\d.]+)" height="([\d.]+)"/.exec(page)!
    for (const found of page.matchAll(/<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)<\/word>/g)) {
      words.push({ page: { width: Number(width), height: Number(height) }, x0: Number(found[1]), y0: Number(found[2]), x1: Number(found[3]), y1: Number(found[4]), word: found[5]! })
    }
  }
  return { codes, text, pageSizes, words }
}

beforeAll(async () => {
  maker = await signedIn(account('maker').email, account('maker').password)
  // These tests use short synthetic takes; the rule that a take covers the surface (coveragePercent) is tested in workshop-truth.test.ts.
  expect((await maker.put('/api/workshop/settings/surface', { coveragePercent: 1 })).status).toBe(200)
  shipper = await signedIn(account('shipper').email, account('shipper').password)
  collector = await signedIn(account('collector').email, account('collector').password)
  // The demo order waiting to be packed: a recorded cylinder cut to order on a tested blank.
  const list = await maker.get('/api/workshop/orders?status=ready_to_pack')
  expect(list.status).toBe(200)
  expect(list.body.rows.length).toBeGreaterThan(0)
  orderNumber = list.body.rows[0].number
  shipToName = list.body.rows[0].name
  const issued = await maker.get(`/api/certificates?order=${orderNumber}`)
  expect(issued.status).toBe(200)
  expect(issued.body.certificates.length).toBeGreaterThan(0)
  certificates = []
  for (const { ticketId } of issued.body.certificates as { ticketId: number }[]) {
    const certificate = await maker.get(`/api/certificates/${ticketId}`)
    expect(certificate.status).toBe(200)
    certificates.push({ ticketId, blankCode: certificate.body.blank.code })
  }
})

const papers = [
  { paper: 'a4', size: '595.28 x 841.89' },
  { paper: 'letter', size: '612 x 792' },
] as const

describe('packing slip', () => {
  for (const { paper, size } of papers) {
    it(`on ${paper} paper: barcode of the order, QR of each certificate and of the care guide, the cautions, no price`, async () => {
      const answer = await fetchBytes(shipper, `/api/dispatch/${orderNumber}/slip.pdf?paper=${paper}`)
      expect(answer.status).toBe(200)
      expect(answer.type).toBe('application/pdf')
      expect(answer.disposition).toBe(`inline; filename=packing-slip-${orderNumber}-${paper}.pdf`)
      expect(answer.bytes.subarray(0, 5).toString()).toBe('%PDF-')
      const pdf = readPdf(`slip-${paper}`, answer.bytes)

      expect(pdf.pageSizes.length).toBeGreaterThan(0)
      for (const pageSize of pdf.pageSizes) expect(pageSize).toBe(size)
      // Scanned as a scanner would: the Code 128 reads the order number, each QR its certificate's address.
      expect(pdf.codes).toContain(orderNumber)
      for (const { ticketId } of certificates) expect(pdf.codes.some(code => code.startsWith(`${siteUrl}/certificates/${ticketId}?t=`)), pdf.codes.join(' ')).toBe(true)
      expect(pdf.codes).toContain(`${siteUrl}/guides/care`)

      const words = pdf.text.replace(/\s+/g, ' ')
      for (const caution of ['FRAGILE', 'KEEP AWAY FROM HEAT AND DIRECT SUN', 'DO NOT LEAVE IN A VEHICLE', 'LET THE PARCEL REACH ROOM TEMPERATURE BEFORE OPENING', 'STORE CYLINDERS UPRIGHT', 'PLAY WITH THE RIGHT STYLUS']) {
        expect(words).toContain(caution)
      }
      expect(words).toMatch(/stylus/i)
      expect(words).toContain(`${siteUrl}/guides/care`)
      expect(words).toContain(orderNumber)
      expect(words).toMatch(/\d{3} rpm/)
      expect(words).toMatch(/[24]-minute/)
      for (const { blankCode } of certificates) expect(words).toContain(blankCode)
      // The ship-to name and the shop's return address are on it.
      expect(words).toContain(shipToName)
      expect(words).toContain('Tallow Yard')
      // Never a price: no currency sign or code, no amount with cents.
      expect(words).not.toMatch(/[$€£¥]|\b(?:USD|EUR|GBP)\b|\d+\.\d{2}\b|price|total/i)
      // Nothing cut off: every word at least 20 pt inside the page's edges.
      expect(pdf.words.length).toBeGreaterThan(50)
      for (const word of pdf.words) {
        expect(word.x0, word.word).toBeGreaterThanOrEqual(20)
        expect(word.y0, word.word).toBeGreaterThanOrEqual(20)
        expect(word.x1, word.word).toBeLessThanOrEqual(word.page.width - 20)
        expect(word.y1, word.word).toBeLessThanOrEqual(word.page.height - 20)
      }
    })
  }

  it('comes in A4 when no paper is named, and refuses an unknown paper naming the field', async () => {
    const plain = await fetchBytes(maker, `/api/dispatch/${orderNumber}/slip.pdf`)
    expect(plain.status).toBe(200)
    expect(readPdf('slip-default', plain.bytes).pageSizes[0]).toBe('595.28 x 841.89')
    const wrong = await shipper.get(`/api/dispatch/${orderNumber}/slip.pdf?paper=a3`)
    expect(wrong.status).toBe(400)
    expect(wrong.body.data.fields.paper).toMatch(/a4 or letter/)
  })

  it('is for the shipper and the maker only; an unknown order is 404, one not ready to pack 409', async () => {
    expect((await collector.get(`/api/dispatch/${orderNumber}/slip.pdf`)).status).toBe(403)
    expect((await new Client().get(`/api/dispatch/${orderNumber}/slip.pdf`)).status).toBe(401)
    expect((await collector.get(`/api/dispatch/${orderNumber}/label.pdf`)).status).toBe(403)
    expect((await new Client().get(`/api/dispatch/${orderNumber}/label.pdf`)).status).toBe(401)
    expect((await shipper.get('/api/dispatch/GW00-99999/slip.pdf')).status).toBe(404)
    expect((await shipper.get('/api/dispatch/GW00-99999/label.pdf')).status).toBe(404)
    const unpaid = await maker.get('/api/workshop/orders?status=awaiting_payment')
    expect(unpaid.body.rows.length).toBeGreaterThan(0)
    const early = await shipper.get(`/api/dispatch/${unpaid.body.rows[0].number}/slip.pdf`)
    expect(early.status).toBe(409)
  })
})

describe('address label', () => {
  it('is 4 × 6 in with both addresses, the order barcode, FRAGILE and KEEP COOL', async () => {
    const answer = await fetchBytes(shipper, `/api/dispatch/${orderNumber}/label.pdf`)
    expect(answer.status).toBe(200)
    expect(answer.type).toBe('application/pdf')
    const pdf = readPdf('label', answer.bytes)
    expect(pdf.pageSizes).toEqual(['288 x 432'])
    expect(pdf.codes).toEqual([orderNumber])
    const words = pdf.text.replace(/\s+/g, ' ')
    expect(words).toContain('FRAGILE')
    expect(words).toContain('KEEP COOL')
    expect(words).toContain('Tallow Yard')
    expect(words).toContain(shipToName)
    expect(words).not.toMatch(/[$€£¥]|\d+\.\d{2}\b/)
    for (const word of pdf.words) {
      expect(word.x0, word.word).toBeGreaterThanOrEqual(10)
      expect(word.x1, word.word).toBeLessThanOrEqual(word.page.width - 10)
      expect(word.y1, word.word).toBeLessThanOrEqual(word.page.height - 10)
    }
  })
})

describe('a guest\'s made cylinder', () => {
  /** A multipart upload as the browser sends it (cookie and this site's Origin). */
  async function upload(path: string, bytes: Uint8Array, name: string) {
    const form = new FormData()
    form.append('file', new Blob([bytes], { type: 'audio/wav' }), name)
    const target = url(path)
    const response = await fetch(target, { method: 'POST', body: form, headers: { origin: new URL(target).origin, accept: 'application/json', cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    return { status: response.status, body: await response.json() as any }
  }

  it('has a certificate code carrying that certificate\'s own key: it opens the certificate without signing in, and not the order', async () => {
    // A tested blank, a recorder and a cylinder cut to order, bought by a guest and made (as tests/server/tickets.test.ts drives it).
    const batch = await maker.post('/api/workshop/batches', { code: 'SL-26-01', formula: 'stearic acid 75 / paraffin 25', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075, softeningPointC: 62 })
    expect(batch.status, JSON.stringify(batch.body)).toBe(201)
    const recorder = await maker.post('/api/workshop/recorders', { name: 'Slip Lathe', stylus: 'sapphire', horn: 'brass' })
    expect(recorder.status).toBe(201)
    const blank = await maker.post('/api/workshop/blanks', { batchId: batch.body.id, format: 'two_minute', count: 1, diameterIn: '2.206' })
    const code = blank.body.codes[0] as string
    expect((await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
    expect((await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)
    const wav = makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed: 5 })
    const tested = await upload(`/api/workshop/blanks/${code}/surface-tests`, wav, `${code}.wav`)
    expect(tested.status, JSON.stringify(tested.body)).toBe(201)
    const product = await maker.post('/api/workshop/products', { slug: 'slip-test-cut', title: 'Slip Test Two-Step', kind: 'recorded', performer: 'The Test Quartet', runningTimeS: 100, format: 'two_minute', material: 'hard stearic wax', priceMinor: 3000, stock: 5, madeToOrder: true })
    expect(product.status, JSON.stringify(product.body)).toBe(201)

    const guest = new Client()
    const bought = await guest.post('/api/checkout', { items: [{ slug: 'slip-test-cut', qty: 1 }], email: 'guest-slip@collectors.test', shippingAddress: { name: 'Perpetua Wick', line1: '9 Lantern Row', city: 'Lowmere', postalCode: 'LM2 8PW', region: 'OR', country: 'US' }, zone: 'domestic' })
    expect(bought.status, JSON.stringify(bought.body)).toBe(201)
    const { orderNumber: number, url: payUrl, accessToken } = bought.body as { orderNumber: string, url: string, accessToken: string }
    const paid = await fetch(`${env.payments.url}/_fake/sessions/${payUrl.split('/').pop()}/complete?wait=true`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })
    expect(paid.status).toBe(200)
    const [ticket] = await waitFor(async () => {
      const board = await maker.get(`/api/workshop/tickets?q=${number}`)
      return board.body.tickets?.length === 1 ? board.body.tickets as { id: number }[] : null
    }, 10_000, 'the ticket')
    expect((await maker.post(`/api/workshop/tickets/${ticket!.id}/assign`, { blankCode: code })).status).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket!.id}/cut`, { recorderId: recorder.body.id })).status).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket!.id}/stage`, { to: 'to_dispatch', note: '' })).status).toBe(200)

    const answer = await fetchBytes(shipper, `/api/dispatch/${number}/slip.pdf?paper=letter`)
    expect(answer.status).toBe(200)
    const pdf = readPdf('slip-guest', answer.bytes)
    expect(pdf.codes).toContain(number)
    const certificateUrl = pdf.codes.find(found => found.startsWith(`${siteUrl}/certificates/${ticket!.id}?t=`))
    expect(certificateUrl, pdf.codes.join(' ')).toBeTruthy()
    const key = new URL(certificateUrl!).searchParams.get('t')!
    // Not the order's key: the slip may travel with a gift, and the order's page shows what was paid.
    expect(key).not.toBe(accessToken)
    expect(pdf.text).toContain(code)
    // The country is kept as its ISO 3166-1 code and printed by name for the carrier.
    expect(pdf.text).toContain('United States')
    // The address read from the code opens the certificate for whoever holds the slip, signed in or not.
    const opened = await new Client().get(`/api/certificates/${ticket!.id}?t=${key}`)
    expect(opened.status).toBe(200)
    expect(opened.body.blank.code).toBe(code)
    expect((await new Client().get(`/api/certificates/${ticket!.id}`)).status).toBe(404)
    // The key opens that certificate only: not the order, not another certificate.
    expect((await new Client().get(`/api/orders/${number}?t=${key}`)).status).toBe(404)
    expect((await new Client().get(`/api/certificates/${certificates[0]!.ticketId}?t=${key}`)).status).toBe(404)
  })
})
