import { createHmac } from 'node:crypto'
import { mkdtempSync, readdirSync } from 'node:fs'
import { connect } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { addCalendarDays, nextShippingDay } from '../../shared/utils/heat'
import { askPaymentFake, Client, postMultipart, signedIn, useTestServer, waitFor, workshopBench } from './harness'

const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-dispatch-uploads-'))
const env = await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })
const payments = env.payments
// The harness's session password signs guests' order links; a guest link is made the same way here.
const sessionPassword = 'test-session-password-that-is-long-enough-0123456789'
const guestToken = (number: string) => createHmac('sha256', `order-link:${sessionPassword}`).update(number).digest('base64url').slice(0, 32)

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let shipper: Client
let customer: Client
let stranger: Client
let batchId: number
let recorderId: number
let counter = 0
const today = () => new Date().toISOString().slice(0, 10)
const defaultShipOn = [1, 2, 3]
const fullChecklist = ['tubes', 'cushioning', 'double_box', 'slip', 'marks']
const address = { name: 'Orla Fenwright', line1: '2 Cask Row', city: 'Lowmere', postalCode: 'LM5 2CR', region: 'OR', country: 'US' }

beforeAll(async () => {
  ;({ maker, batchId, recorderId } = await workshopBench({ batchCode: 'DS-26-01', formula: 'stearic acid 75 / paraffin 25', recorderName: 'Dispatch Lathe', horn: 'brass, 24 in' }))
  shipper = await signedIn(account('shipper').email, account('shipper').password)
  customer = await signedIn(account('collector').email, account('collector').password)
  stranger = new Client()
  const registered = await stranger.post('/api/auth/register', { name: 'Pell Ashgrove', email: `pell-${Date.now()}@collectors.test`, password: 'a-long-and-unusual-phrase' })
  expect(registered.status, JSON.stringify(registered.body)).toBeLessThan(300)
})

// ——— helpers ———

const fake = (path: string, body?: unknown) => askPaymentFake(payments, path, body)

/** A multipart POST as the browser sends it (cookie and this site's Origin). */
function multipart(client: Client, path: string, files: { field: string, name: string, bytes: Uint8Array, type?: string }[], fields: Record<string, string> = {}) {
  return postMultipart(client, path, files.map(file => ({ ...file, type: file.type ?? 'application/octet-stream' })), fields)
}

async function testedBlank(): Promise<string> {
  const created = await maker.post('/api/workshop/blanks', { batchId, format: 'two_minute', count: 1, diameterIn: '2.206' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const code = created.body.codes[0] as string
  expect((await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
  expect((await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)
  const wav = makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed: 7 + counter })
  const tested = await multipart(maker, `/api/workshop/blanks/${code}/surface-tests`, [{ field: 'file', name: `${code}.wav`, bytes: wav, type: 'audio/wav' }])
  expect(tested.status, JSON.stringify(tested.body)).toBe(201)
  return code
}

/** A paid order of `qty` cylinders cut to order by the demo collector, driven to ready to pack; with its tickets' blanks. */
async function readyOrder(qty: number) {
  const product = await maker.post('/api/workshop/products', {
    slug: `dispatch-cut-${Date.now()}-${++counter}`, title: `Dispatch cut ${counter}`, kind: 'recorded', performer: 'The Test Quartet', runningTimeS: 100,
    format: 'two_minute', material: 'hard stearic wax', priceMinor: 3000, stock: 100, madeToOrder: true,
  })
  expect(product.status, JSON.stringify(product.body)).toBe(201)
  const created = await customer.post('/api/checkout', { items: [{ slug: product.body.slug, qty }], email: account('collector').email, shippingAddress: address, zone: 'domestic' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const orderNumber = created.body.orderNumber as string
  await fake(`/_fake/sessions/${(created.body.url as string).split('/').pop()}/complete?wait=true`, {})
  const tickets = await waitFor(async () => {
    const board = await maker.get(`/api/workshop/tickets?q=${orderNumber}`)
    return board.body.tickets?.length === qty ? board.body.tickets as any[] : null
  }, 10_000, 'the tickets')
  const blankCodes: string[] = []
  for (const ticket of tickets) {
    const code = await testedBlank()
    blankCodes.push(code)
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/assign`, { blankCode: code })).status).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/cut`, { recorderId })).status).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/stage`, { to: 'to_dispatch', note: '' })).status).toBe(200)
  }
  expect((await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status).toBe('ready_to_pack')
  return { orderNumber, blankCodes, ticketIds: tickets.map(t => t.id as number) }
}

const heatCheck = (client: Client, number: string, body: unknown) => client.post(`/api/dispatch/${number}/heat-check`, body)
const pack = (number: string, body: unknown = { checklist: fullChecklist }) => shipper.post(`/api/dispatch/${number}/pack`, body)
const ship = (number: string, body: unknown) => shipper.post(`/api/dispatch/${number}/ship`, body)

async function demoOrder(status: string, owner?: string) {
  // Oldest first: the demo's own orders before those the tests make.
  const list = await maker.get(`/api/workshop/orders?status=${status}&pageSize=50&sort=oldest`)
  const row = (list.body.rows as any[]).find(r => owner === undefined || r.email === owner)
  expect(row, `a demo order that is ${status}`).toBeTruthy()
  return row.number as string
}

/** Every key of an answer, however deep. */
function keysOf(value: unknown, found: string[] = []): string[] {
  if (Array.isArray(value)) value.forEach(item => keysOf(item, found))
  else if (value && typeof value === 'object') {
    for (const [key, item] of Object.entries(value)) {
      found.push(key)
      keysOf(item, found)
    }
  }
  return found
}
const moneyKey = /price|minor|total|payment|stripe/i

const mailsAbout = (number: string, subject: RegExp) => env.fake.list().filter(m => m.subject.includes(number) && subject.test(m.subject))

// ——— heat ———

describe('heat check', () => {
  it('38 °C (100 °F) with 3 days in transit holds the order; 18 °C (64 °F) lets it go; the hold keeps it off the packing list', async () => {
    const number = await demoOrder('ready_to_pack')
    const transit = 3
    for (const body of [{ forecastHigh: 100, unit: 'F', transitDays: transit }, { forecastHigh: 38, transitDays: transit }]) {
      const hot = await heatCheck(shipper, number, body)
      expect(hot.status, JSON.stringify(hot.body)).toBe(200)
      expect(hot.body.verdict).toBe('hold')
      // Defaults: hold at 32 °C, 1 °C stricter for each of the 2 days beyond the first → 30 °C.
      expect(hot.body.holdAtC).toBe(30)
      expect(hot.body.cautionAtC).toBe(25)
      expect(hot.body.nextShipDate).toBe(nextShippingDay(addCalendarDays(today(), 2), defaultShipOn, { daysInTransit: transit }))
      expect(hot.body.nextShipDate > today()).toBe(true)
    }
    const queue = await shipper.get('/api/dispatch/queue')
    expect(queue.body.held.map((e: any) => e.number)).toContain(number)
    expect(queue.body.readyToPack.map((e: any) => e.number)).not.toContain(number)
    const held = await pack(number)
    expect(held.status).toBe(409)
    expect(held.body.message).toMatch(/held back by the heat check/)

    for (const body of [{ forecastHigh: 64, unit: 'F', transitDays: transit }, { forecastHigh: 18, unit: 'C', transitDays: transit }]) {
      const cool = await heatCheck(shipper, number, body)
      expect(cool.status).toBe(200)
      expect(cool.body.verdict).toBe('ok')
      expect(cool.body.forecastHighC).toBe(body.unit === 'F' ? 17.8 : 18)
      expect(cool.body.nextShipDate).toBe(nextShippingDay(today(), defaultShipOn, { daysInTransit: transit }))
    }
    const after = await shipper.get('/api/dispatch/queue')
    expect(after.body.readyToPack.map((e: any) => e.number)).toContain(number)
    expect(after.body.held.map((e: any) => e.number)).not.toContain(number)
    const detail = await shipper.get(`/api/dispatch/${number}`)
    expect(detail.body.heatChecks.map((c: any) => c.verdict)).toEqual(['ok', 'ok', 'hold', 'hold'])
  })

  it('follows the shop\'s thresholds and shipping days when the maker changes them', async () => {
    const number = await demoOrder('ready_to_pack')
    const stored = (await maker.get('/api/workshop/settings/engine')).body.settings
    const cooler = { ...stored, heat: { ...stored.heat, cautionHighC: 12, holdHighC: 16 }, dispatch: { ...stored.dispatch, shipOn: { monday: false, tuesday: false, wednesday: false, thursday: true, friday: false, saturday: false, sunday: false } } }
    expect((await maker.put('/api/workshop/settings/engine', cooler)).status).toBe(200)
    try {
      const check = await heatCheck(shipper, number, { forecastHigh: 18, unit: 'C', transitDays: 1 })
      expect(check.body).toMatchObject({ verdict: 'hold', holdAtC: 16, cautionAtC: 12 })
      expect(new Date(`${check.body.nextShipDate}T00:00:00Z`).getUTCDay()).toBe(4)
      const mild = await heatCheck(shipper, number, { forecastHigh: 10, unit: 'C', transitDays: 1 })
      expect(mild.body.verdict).toBe('ok')
      expect(mild.body.nextShipDate).toBe(nextShippingDay(today(), [4], { daysInTransit: 1 }))
      expect((await shipper.get(`/api/dispatch/${number}`)).body.shipOn).toEqual(['thursday'])
    }
    finally {
      expect((await maker.put('/api/workshop/settings/engine', stored)).status).toBe(200)
    }
  })

  it('refuses bad input naming the field, an order not in dispatch with its state, and the customer', async () => {
    const number = await demoOrder('ready_to_pack')
    for (const [body, field] of [[{ forecastHigh: 'hot', transitDays: 1 }, 'forecastHigh'], [{ forecastHigh: 20, transitDays: 15 }, 'transitDays'], [{ forecastHigh: 20, transitDays: 1, unit: 'K' }, 'unit'], [{ forecastHigh: 90, unit: 'C', transitDays: 1 }, 'forecastHigh']] as const) {
      const answer = await heatCheck(shipper, number, body)
      expect(answer.status).toBe(400)
      expect(answer.body.data.fields).toHaveProperty(field)
    }
    const inProduction = await demoOrder('in_production')
    const refused = await heatCheck(shipper, inProduction, { forecastHigh: 20, transitDays: 1 })
    expect(refused.status).toBe(409)
    expect(refused.body.message).toMatch(/in production/)
    expect((await heatCheck(customer, number, { forecastHigh: 20, transitDays: 1 })).status).toBe(403)
    expect((await heatCheck(shipper, 'GW26-99999', { forecastHigh: 20, transitDays: 1 })).status).toBe(404)
  })
})

// ——— packing, shipping, delivery ———

describe('the whole path: heat check, pack, ship, delivered', () => {
  // Made in the first test (hooks inside a describe run without the server's test context).
  let path: Awaited<ReturnType<typeof readyOrder>>

  it('the detail: contents with blanks, the engine\'s box and weights, the checklist; another outer box on request; a box too small is a 400 naming boxId', async () => {
    path = await readyOrder(3)
    const detail = await shipper.get(`/api/dispatch/${path.orderNumber}`)
    expect(detail.status, JSON.stringify(detail.body)).toBe(200)
    expect(detail.body.contents[0].blankCodes.sort()).toEqual([...path.blankCodes].sort())
    expect(detail.body.promisedDate).toBe(addCalendarDays(today(), 10))
    // Three cylinders: a 6 × 6 × 6 inner box in a 12 × 12 × 12 outer (hand calculation in tests/unit/dispatch-engine.test.ts).
    expect(detail.body.packing).toMatchObject({ ok: true, boxId: 'box-12x12x12', innerBox: '6 × 6 × 6 in', actualWeightG: 1025, billableWeightG: 6222, cushioningIn: 2.8 })
    expect(detail.body.checklist.map((line: any) => line.id)).toEqual(fullChecklist)
    // In the shop's length unit (inches by default), millimetres beside: 2 in ≈ 50 mm (carriers' metric guidance: 5 cm).
    expect(detail.body.checklist.find((line: any) => line.id === 'cushioning').label).toBe('At least 2 in (50 mm) of cushioning on every side')
    expect(detail.body.carriers.map((c: any) => c.id)).toEqual(['post', 'courier'])
    expect(detail.body.temperatureUnit).toBe('F')
    expect(detail.body.boxes.length).toBeGreaterThan(5)
    const larger = await shipper.get(`/api/dispatch/${path.orderNumber}?boxId=box-16x16x14`)
    expect(larger.body.packing).toMatchObject({ boxId: 'box-16x16x14', outerBox: '16 × 16 × 14 in' })
    const small = await shipper.get(`/api/dispatch/${path.orderNumber}?boxId=box-8x8x8`)
    expect(small.status).toBe(400)
    expect(small.body.data.fields.boxId).toMatch(/does not take 3 tube/)
    expect((await customer.get(`/api/dispatch/${path.orderNumber}`)).status).toBe(403)
    expect((await shipper.get(`/api/dispatch/${await demoOrder('awaiting_payment')}`)).status).toBe(404)
  }, 240_000)

  it('pack: every checklist line that applies; two presses at once pack once', async () => {
    const missing = await pack(path.orderNumber, { checklist: ['tubes', 'slip'] })
    expect(missing.status).toBe(400)
    expect(missing.body.data.fields.checklist).toMatch(/cushioning, double_box, marks/)
    expect((await pack(path.orderNumber, { checklist: fullChecklist, weighedG: 0 })).body.data.fields).toHaveProperty('weighedG')
    expect((await maker.get(`/api/workshop/orders/${path.orderNumber}`)).body.status).toBe('ready_to_pack')

    const body = { checklist: fullChecklist, weighedG: 1180, boxId: 'box-14x14x12' }
    const answers = await Promise.all([pack(path.orderNumber, body), pack(path.orderNumber, body)])
    expect(answers.map(a => a.status).sort()).toEqual([200, 409])
    const packed = answers.find(a => a.status === 200)!
    expect(packed.body).toMatchObject({ status: 'packed', weighedG: 1180, packing: { boxId: 'box-14x14x12' } })
    expect(answers.find(a => a.status === 409)!.body.message).toMatch(/packed/)
    expect(keysOf(packed.body).filter(key => moneyKey.test(key))).toEqual([])
    const timeline = (await maker.get(`/api/workshop/orders/${path.orderNumber}`)).body.timeline.map((step: any) => step.to)
    expect(timeline.filter((to: string) => to === 'packed')).toHaveLength(1)
    const queue = await shipper.get(`/api/dispatch/queue?q=${path.orderNumber.toLowerCase()}`)
    expect(queue.body.packed.map((e: any) => e.number)).toEqual([path.orderNumber])
    expect(queue.body.packed[0].shipment.packedAt).toBeTruthy()
  })

  it('ship: a bad postal number is refused; two presses at once ship once, close the tickets, ship the blanks and send one mail', async () => {
    const wrongDigit = await ship(path.orderNumber, { carrier: 'post', trackingNumber: 'RR473124828GB' })
    expect(wrongDigit.status).toBe(400)
    expect(wrongDigit.body.data.fields.trackingNumber).toMatch(/check digit/)
    expect((await ship(path.orderNumber, { carrier: 'post', trackingNumber: 'ab<1>' })).body.data.fields).toHaveProperty('trackingNumber')
    expect((await maker.get(`/api/workshop/orders/${path.orderNumber}`)).body.status).toBe('packed')

    const body = { carrier: 'post', trackingNumber: 'rr 473 124 829 gb' }
    const answers = await Promise.all([ship(path.orderNumber, body), ship(path.orderNumber, body)])
    expect(answers.map(a => a.status).sort()).toEqual([200, 409])
    expect(answers.find(a => a.status === 200)!.body).toMatchObject({ status: 'shipped', trackingNumber: 'RR473124829GB', ticketsDone: 3 })
    expect(keysOf(answers.find(a => a.status === 200)!.body).filter(key => moneyKey.test(key))).toEqual([])

    const order = await maker.get(`/api/workshop/orders/${path.orderNumber}`)
    expect(order.body.status).toBe('shipped')
    expect(order.body.timeline.filter((step: any) => step.to === 'shipped')).toHaveLength(1)
    const tickets = (await maker.get(`/api/workshop/tickets?q=${path.orderNumber}`)).body.tickets as any[]
    expect(tickets.map(t => t.stage)).toEqual(['done', 'done', 'done'])
    for (const code of path.blankCodes) expect((await maker.get(`/api/workshop/blanks/${code}`)).body.blank.state).toBe('shipped')

    const mails = await waitFor(async () => {
      const found = mailsAbout(path.orderNumber, /on its way/)
      return found.length ? found : null
    }, 10_000, 'the shipped mail')
    // Give the mail loop (150 ms a pass) several more passes: a second mail would show by now.
    await new Promise(resolve => setTimeout(resolve, 900))
    expect(mailsAbout(path.orderNumber, /on its way/)).toHaveLength(1)
    expect(mails[0]!.to).toEqual([account('collector').email])
    expect(mails[0]!.text).toMatch(/RR473124829GB/)
    expect(mails[0]!.text).toMatch(/upright on its end/)
    expect(mails[0]!.text).toMatch(/room temperature/)
    expect(mails[0]!.text).toMatch(/by its ends/)
    expect(mails[0]!.text).toMatch(/\/guides\/care/)
    expect(mails[0]!.text).toMatch(/\/guides\/shipping-and-heat/)

    const again = await ship(path.orderNumber, body)
    expect(again.status).toBe(409)
    const shipped = await shipper.get(`/api/dispatch/queue?q=rr473124829`)
    expect(shipped.body.shipped.map((e: any) => e.number)).toEqual([path.orderNumber])
  })

  it('delivered by the customer (a second press is a 409); a stranger gets 404; the order page shows the shipment and the claim window', async () => {
    const view = await customer.get(`/api/orders/${path.orderNumber}`)
    expect(view.body).toMatchObject({ status: 'shipped', canMarkDelivered: true, canClaim: false, claimUntil: null, shipment: { carrier: 'post', carrierLabel: 'Postal service', trackingNumber: 'RR473124829GB' } })
    expect((await stranger.post(`/api/orders/${path.orderNumber}/delivered`)).status).toBe(404)
    expect((await new Client().post(`/api/orders/${path.orderNumber}/delivered`)).status).toBe(404)
    const delivered = await customer.post(`/api/orders/${path.orderNumber}/delivered`)
    expect(delivered.status, JSON.stringify(delivered.body)).toBe(200)
    expect(delivered.body).toMatchObject({ status: 'delivered', deliveredVia: 'customer' })
    const twice = await customer.post(`/api/orders/${path.orderNumber}/delivered`)
    expect(twice.status).toBe(409)
    expect(twice.body.message).toMatch(/already delivered/)
    const after = await customer.get(`/api/orders/${path.orderNumber}`)
    expect(after.body).toMatchObject({ status: 'delivered', canMarkDelivered: false, canClaim: true, claimUntil: addCalendarDays(today(), 14) })
    expect(after.body.shipment.deliveredAt).toBeTruthy()
  })

  it('the shipper marks a demo shipped order delivered; pack and ship refuse an order in the wrong state', async () => {
    const number = await demoOrder('shipped', account('collector').email)
    expect((await pack(number)).status).toBe(409)
    expect((await ship(number, { carrier: 'courier', trackingNumber: 'CX-100200' })).status).toBe(409)
    const delivered = await shipper.post(`/api/dispatch/${number}/delivered`)
    expect(delivered.status, JSON.stringify(delivered.body)).toBe(200)
    expect(delivered.body.deliveredVia).toBe('shipper')
    expect((await shipper.post(`/api/dispatch/${number}/delivered`)).status).toBe(409)
  })

  it('a packed parcel that a heat check holds back is not shipped until the check allows it', async () => {
    const number = await demoOrder('packed')
    expect((await heatCheck(shipper, number, { forecastHigh: 40, unit: 'C', transitDays: 2 })).body.verdict).toBe('hold')
    const held = await ship(number, { carrier: 'courier', trackingNumber: 'CX-300400' })
    expect(held.status).toBe(409)
    expect(held.body.data.nextShipDate > today()).toBe(true)
    expect((await heatCheck(shipper, number, { forecastHigh: 15, unit: 'C', transitDays: 2 })).body.verdict).toBe('ok')
    expect((await maker.get(`/api/workshop/orders/${number}`)).body.status).toBe('packed')
  })

  it('a shipper sees no price or payment anywhere in dispatch, and cannot refund or answer claims', async () => {
    const answers = [
      await shipper.get('/api/dispatch/queue'),
      await shipper.get(`/api/dispatch/${path.orderNumber}`),
      await shipper.get(`/api/dispatch/${await demoOrder('packed')}`),
      await shipper.get(`/api/dispatch/${await demoOrder('ready_to_pack')}?boxId=box-18x18x16`),
      await heatCheck(shipper, await demoOrder('ready_to_pack'), { forecastHigh: 20, transitDays: 2 }),
    ]
    for (const answer of answers) {
      expect(answer.status).toBe(200)
      const keys = keysOf(answer.body)
      expect(keys.length).toBeGreaterThan(5)
      expect(keys.filter(key => moneyKey.test(key))).toEqual([])
    }
    const queue = answers[0]!.body
    expect(queue.readyToPack.length + queue.packed.length + queue.shipped.length).toBeGreaterThan(2)
    expect((await shipper.post(`/api/workshop/orders/${path.orderNumber}/refund`, { reason: 'broken' })).status).toBe(403)
    expect((await shipper.get('/api/workshop/claims')).status).toBe(403)
    expect((await shipper.post('/api/workshop/claims/1/resolve', { action: 'refund', note: 'x' })).status).toBe(403)
  })
})

// ——— claims ———

describe('breakage claims', () => {
  let number: string
  let itemId: number
  let png: Buffer

  it('a delivered order to claim on (made, packed, shipped and delivered here)', async () => {
    const made = await readyOrder(1)
    number = made.orderNumber
    expect((await pack(number)).status).toBe(200)
    expect((await ship(number, { carrier: 'courier', trackingNumber: `CL-${Date.now()}` })).status).toBe(200)
    expect((await customer.post(`/api/orders/${number}/delivered`)).status).toBe(200)
    itemId = (await customer.get(`/api/orders/${number}`)).body.items[0].id
    png = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 180, g: 120, b: 60 } } }).png().toBuffer()
    expect((await customer.get(`/api/orders/${number}`)).body.canClaim).toBe(true)
  }, 240_000)

  const uploadsCount = () => readdirSync(uploadsDir, { recursive: true }).length
  const claimCount = async () => ((await maker.get('/api/workshop/claims')).body.claims as any[]).length

  it('a renamed script as a photo is refused naming photos, and nothing is stored', async () => {
    const files = uploadsCount()
    const claims = await claimCount()
    const script = new TextEncoder().encode('#!/bin/sh\nrm -rf /\n')
    const refused = await multipart(customer, `/api/orders/${number}/claims`, [
      { field: 'photos', name: 'crack.png', bytes: png, type: 'image/png' },
      { field: 'photos', name: 'box.jpg', bytes: script, type: 'image/jpeg' },
    ], { description: 'The second cylinder is cracked along its length.' })
    expect(refused.status).toBe(415)
    expect(refused.body.data.fields).toHaveProperty('photos')
    expect(refused.body.message).toMatch(/a script/)
    expect(uploadsCount()).toBe(files)
    expect(await claimCount()).toBe(claims)
    const none = await multipart(customer, `/api/orders/${number}/claims`, [], { description: 'The cylinder is cracked along its length.' })
    expect(none.status).toBe(400)
    expect(none.body.data.fields).toHaveProperty('photos')
    const short = await multipart(customer, `/api/orders/${number}/claims`, [{ field: 'photos', name: 'a.png', bytes: png }], { description: 'broken' })
    expect(short.body.data.fields).toHaveProperty('description')
    const wrongItem = await multipart(customer, `/api/orders/${number}/claims`, [{ field: 'photos', name: 'a.png', bytes: png }], { description: 'The cylinder is cracked.', itemIds: '1,999999' })
    expect(wrongItem.body.data.fields).toHaveProperty('itemIds')
    expect(await claimCount()).toBe(claims)
  })

  it('more than 6 photos is a 400 naming photos; a declared size over 6 × 8 MB is a 413 before the body is read', async () => {
    const seven = Array.from({ length: 7 }, (_, i) => ({ field: 'photos', name: `p${i}.png`, bytes: png, type: 'image/png' }))
    const many = await multipart(customer, `/api/orders/${number}/claims`, seven, { description: 'Seven views of the same crack.' })
    expect(many.status).toBe(400)
    expect(many.body.data.fields.photos).toMatch(/at most 6/)
    // Only the head of the request is sent: the server must answer from the declared length alone.
    const target = new URL(url(`/api/orders/${number}/claims`))
    const cookie = [...customer.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    const head = await new Promise<string>((resolve, reject) => {
      const socket = connect(Number(target.port), target.hostname, () => {
        socket.write([`POST ${target.pathname} HTTP/1.1`, `Host: ${target.host}`, `Origin: ${target.origin}`, `Cookie: ${cookie}`, 'Accept: application/json',
          'Content-Type: multipart/form-data; boundary=x', `Content-Length: ${6 * 8 * 1024 * 1024 + 70 * 1024}`, '', ''].join('\r\n'))
      })
      let text = ''
      socket.on('data', (chunk) => {
        text += chunk.toString('utf8')
        if (text.includes('\r\n\r\n')) {
          socket.destroy()
          resolve(text)
        }
      })
      socket.on('error', reject)
      setTimeout(() => reject(new Error('no answer to the oversized upload')), 10_000)
    })
    expect(head).toMatch(/^HTTP\/1\.1 413/)
  })

  it('another customer\'s order is 404; the owner files a claim with photos; the maker and the customer are mailed; the photos are theirs alone', async () => {
    const fields = { description: 'The cylinder arrived in three pieces; the tube was crushed.', itemIds: String(itemId) }
    const photos = [{ field: 'photos', name: 'pieces.png', bytes: png, type: 'image/png' }, { field: 'photos', name: 'tube.png', bytes: png, type: 'image/png' }]
    expect((await multipart(stranger, `/api/orders/${number}/claims`, photos, fields)).status).toBe(404)
    expect((await multipart(new Client(), `/api/orders/${number}/claims`, photos, fields)).status).toBe(404)
    const filed = await multipart(customer, `/api/orders/${number}/claims`, photos, fields)
    expect(filed.status, JSON.stringify(filed.body)).toBe(201)
    expect(filed.body).toMatchObject({ status: 'open', itemIds: [itemId] })
    expect(filed.body.photoUrls).toHaveLength(2)
    const photoUrl = filed.body.photoUrls[0] as string
    const photo = await fetch(url(photoUrl), { headers: { cookie: [...customer.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    expect(photo.status).toBe(200)
    expect(photo.headers.get('content-type')).toBe('image/webp')
    expect((await stranger.get(photoUrl)).status).toBe(404)
    expect((await shipper.get(photoUrl)).status).toBe(404)
    expect((await new Client().get(photoUrl)).status).toBe(404)
    expect((await maker.get(photoUrl)).headers.get('content-type')).toBe('image/webp')

    await waitFor(async () => mailsAbout(number, /Breakage reported/).length > 0 && mailsAbout(number, /We have your breakage report/).length > 0, 10_000, 'the claim mails')
    expect(mailsAbout(number, /Breakage reported/)[0]!.to).toEqual([account('maker').email])
    const view = await customer.get(`/api/orders/${number}`)
    expect(view.body.claims).toEqual([expect.objectContaining({ id: filed.body.id, status: 'open', photoUrls: filed.body.photoUrls })])
  })

  it('after the claim window it is a 409 with the last date (a demo order delivered weeks ago, through its guest link)', async () => {
    const old = await demoOrder('delivered')
    const order = await maker.get(`/api/workshop/orders/${old}`)
    const deliveredOn = String(order.body.timeline.find((step: any) => step.to === 'delivered').at).slice(0, 10)
    const lastDate = addCalendarDays(deliveredOn, 14)
    expect(lastDate < today()).toBe(true)
    expect((await new Client().get(`/api/orders/${old}?t=${guestToken(old)}`)).body).toMatchObject({ canClaim: false, claimUntil: lastDate })
    const late = await multipart(new Client(), `/api/orders/${old}/claims?t=${guestToken(old)}`, [{ field: 'photos', name: 'a.png', bytes: png }], { description: 'It was cracked when I opened it.' })
    expect(late.status).toBe(409)
    expect(late.body.data.lastDate).toBe(lastDate)
    // The message writes the day in the shop's locale (en-US by default: "November 30, 2026"); the data keeps the ISO day.
    expect(late.body.message).toContain(new Intl.DateTimeFormat('en-US', { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${lastDate}T12:00:00Z`)))
    expect((await multipart(new Client(), `/api/orders/${old}/claims?t=not-the-token`, [{ field: 'photos', name: 'a.png', bytes: png }], { description: 'It was cracked when I opened it.' })).status).toBe(404)
  })

  it('the maker answers each claim once: a refund of the broken item, a decline, a replacement with new tickets', async () => {
    const list = await maker.get('/api/workshop/claims?status=open')
    const claim = (list.body.claims as any[]).find(c => c.orderNumber === number)
    expect(claim).toMatchObject({ customerEmail: account('collector').email, items: [expect.objectContaining({ id: itemId })], status: 'open' })
    expect((await maker.post(`/api/workshop/claims/${claim.id}/resolve`, { action: 'decline', note: '' })).body.data.fields).toHaveProperty('note')

    const refund = await maker.post(`/api/workshop/claims/${claim.id}/resolve`, { action: 'refund', note: 'Sorry: refunded the broken cylinder.' })
    expect(refund.status, JSON.stringify(refund.body)).toBe(200)
    expect(refund.body).toMatchObject({ status: 'refunded', amountMinor: 3000 })
    expect((await maker.post(`/api/workshop/claims/${claim.id}/resolve`, { action: 'replace', note: 'again' })).status).toBe(409)
    const refunds = (await maker.get(`/api/workshop/orders/${number}`)).body.refunds as any[]
    expect(refunds.map(r => r.amountMinor)).toEqual([3000])
    await waitFor(async () => mailsAbout(number, /Your breakage report/).length > 0, 10_000, 'the answer mail')

    const second = await multipart(customer, `/api/orders/${number}/claims`, [{ field: 'photos', name: 'b.png', bytes: png }], { description: 'The lid of the tube was split as well.' })
    expect(second.status).toBe(201)
    const declined = await maker.post(`/api/workshop/claims/${second.body.id}/resolve`, { action: 'decline', note: 'The tube is packing, not the cylinder.' })
    expect(declined.body.status).toBe('declined')

    const third = await multipart(customer, `/api/orders/${number}/claims`, [{ field: 'photos', name: 'c.png', bytes: png }], { description: 'Found a second crack on closer look.', itemIds: String(itemId) })
    const replaced = await maker.post(`/api/workshop/claims/${third.body.id}/resolve`, { action: 'replace', note: 'A new one is being cut.' })
    expect(replaced.status, JSON.stringify(replaced.body)).toBe(200)
    expect(replaced.body.ticketIds).toHaveLength(1)
    const tickets = (await maker.get(`/api/workshop/tickets?q=${number}`)).body.tickets as any[]
    expect(tickets.map(t => [t.unit, t.stage]).sort()).toEqual([[1, 'done'], [2, 'queued']])
    expect((await maker.get(`/api/workshop/orders/${number}`)).body.status).toBe('in_production')
    expect((await customer.get(`/api/orders/${number}`)).body.claims.map((c: any) => c.status)).toEqual(['refunded', 'declined', 'replaced'])
  })
})
