import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { analyseSurfaceWav, makeSurfaceWav, surfaceThresholdsSchema } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { askPaymentFake, Client, postMultipart, signedIn, useTestServer, waitFor, workshopBench } from './harness'

const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-ticket-uploads-'))
const env = await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })
const payments = env.payments

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let collector: Client
let batchId: number
let recorderId: number
let counter = 0

const address = { name: 'Tamsin Orrell', line1: '4 Wick Lane', city: 'Lowmere', postalCode: 'LM3 1WL', region: 'OR', country: 'US' }

beforeAll(async () => {
  expect((await new Client().get('/api/health')).status).toBe(200)
  ;({ maker, batchId, recorderId } = await workshopBench({ batchCode: 'TK-26-01', formula: 'stearic acid 75 / paraffin 15 / carnauba 10', recorderName: 'Test Lathe', horn: 'brass, 24 in' }))
  collector = await signedIn(account('collector').email, account('collector').password)
})

// ——— helpers ———

const fake = (path: string, body?: unknown) => askPaymentFake(payments, path, body)

/** A multipart upload as the browser sends it (cookie and this site's Origin). */
function upload(client: Client, path: string, file: { name: string, bytes: Uint8Array } | null, fields: Record<string, string> = {}) {
  return postMultipart(client, path, file ? [{ field: 'file', name: file.name, bytes: file.bytes, type: 'audio/wav' }] : [], fields)
}

// Synthetic play-throughs with known answers (server/audio/synth.ts): 6 s at 22.05 kHz, over the
// ten turns at 160 rpm that the once-per-turn measure needs.
const quietWav = (seed = 7) => makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed })
const loudWav = () => makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -40, swellDepth: 0.02, seed: 8 })

async function shavedBlank(format: 'two_minute' | 'four_minute'): Promise<string> {
  const created = await maker.post('/api/workshop/blanks', { batchId, format, count: 1, diameterIn: '2.206' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const code = created.body.codes[0] as string
  const reamed = await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })
  expect(reamed.status, JSON.stringify(reamed.body)).toBe(201)
  const shaved = await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })
  expect(shaved.status, JSON.stringify(shaved.body)).toBe(201)
  return code
}

async function testedBlank(format: 'two_minute' | 'four_minute', wav = quietWav()): Promise<string> {
  const code = await shavedBlank(format)
  const tested = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: `${code}.wav`, bytes: wav })
  expect(tested.status, JSON.stringify(tested.body)).toBe(201)
  return code
}

async function madeToOrderProduct(format: 'two_minute' | 'four_minute' = 'four_minute') {
  const answer = await maker.post('/api/workshop/products', {
    slug: `cut-to-order-${Date.now()}-${++counter}`, title: `Cut to order ${counter}`, kind: 'recorded', performer: 'The Test Quartet', runningTimeS: 100,
    format, material: 'hard stearic wax', priceMinor: 3000, stock: 100, madeToOrder: true,
  })
  expect(answer.status, JSON.stringify(answer.body)).toBe(201)
  return answer.body as { id: number, slug: string }
}

/** Checks out as `buyer` and, unless told not to, pays through the payment fake and waits for the webhook. */
async function order(buyer: Client, items: { slug: string, qty: number }[], pay = true) {
  const created = await buyer.post('/api/checkout', { items, email: `buyer-${Date.now()}-${++counter}@collectors.test`, shippingAddress: address, zone: 'domestic' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const { orderNumber, url: payUrl, accessToken } = created.body as { orderNumber: string, url: string, accessToken: string }
  let eventId: string | undefined
  if (pay) {
    const completed = await fake(`/_fake/sessions/${payUrl.split('/').pop()}/complete?wait=true`, {})
    eventId = completed.event.id
    await waitFor(async () => (await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status !== 'awaiting_payment', 10_000, 'the order to be paid')
  }
  return { orderNumber, accessToken, eventId }
}

async function ticketsOf(orderNumber: string) {
  const board = await maker.get(`/api/workshop/tickets?q=${orderNumber}`)
  expect(board.status).toBe(200)
  return (board.body.tickets as any[]).sort((a, b) => a.unit - b.unit)
}

/** A paid order of one made-to-order cylinder as the demo collector, and its ticket once it is open. */
async function orderWithOneTicket(product: { slug: string }) {
  const placed = await order(collector, [{ slug: product.slug, qty: 1 }])
  const [ticket] = await waitFor(async () => {
    const found = await ticketsOf(placed.orderNumber)
    return found.length === 1 ? found : null
  }, 10_000, 'the ticket')
  return { placed, ticket }
}

async function orderStatus(orderNumber: string) {
  return (await maker.get(`/api/workshop/orders/${orderNumber}`)).body.status as string
}

const assign = (ticketId: number, blankCode: string) => maker.post(`/api/workshop/tickets/${ticketId}/assign`, { blankCode })
const cut = (ticketId: number) => maker.post(`/api/workshop/tickets/${ticketId}/cut`, { recorderId })
const stage = (ticketId: number, to: string, note = '') => maker.post(`/api/workshop/tickets/${ticketId}/stage`, { to, note })

// ——— creation ———

describe('tickets from orders', () => {
  it('a paid order gets one ticket per cylinder cut to order, due after the lead time; the order goes into production; a repeated webhook adds none', async () => {
    const product = await madeToOrderProduct()
    const placed = await order(collector, [{ slug: product.slug, qty: 2 }, { slug: 'plain-blank-2-minute-stearic-acid', qty: 1 }])
    const tickets = await waitFor(async () => {
      const found = await ticketsOf(placed.orderNumber)
      return found.length === 2 ? found : null
    }, 10_000, 'two tickets')
    expect(tickets.map(t => [t.unit, t.stage, t.format, t.quantity])).toEqual([[1, 'queued', 'four_minute', 2], [2, 'queued', 'four_minute', 2]])
    // Due date = the payment's date + 10 days (the shop's lead time).
    const due = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 10)
    expect(tickets[0].dueDate).toBe(due)
    expect(await orderStatus(placed.orderNumber)).toBe('in_production')

    await fake(`/_fake/events/${placed.eventId}/duplicate`, { times: 3 })
    await waitFor(async () => (await fake(`/_fake/deliveries?event=${placed.eventId}`)).data.filter((d: any) => d.status === 200).length >= 4, 10_000, 'the duplicates')
    expect(await ticketsOf(placed.orderNumber)).toHaveLength(2)
    const detail = await maker.get(`/api/workshop/tickets/${tickets[0].id}`)
    expect(detail.status).toBe(200)
    expect(detail.body.events.map((e: any) => [e.from, e.to])).toEqual([[null, 'queued']])
  })

  it('an unpaid order gets no ticket, and a paid order of stock items only gets none either: it goes straight to packing', async () => {
    const product = await madeToOrderProduct()
    const unpaid = await order(collector, [{ slug: product.slug, qty: 1 }], false)
    const stockOnly = await order(collector, [{ slug: 'plain-blank-4-minute-paraffin', qty: 1 }])
    await new Promise(resolve => setTimeout(resolve, 500))
    expect(await ticketsOf(unpaid.orderNumber)).toHaveLength(0)
    expect(await orderStatus(unpaid.orderNumber)).toBe('awaiting_payment')
    expect(await ticketsOf(stockOnly.orderNumber)).toHaveLength(0)
    expect(await orderStatus(stockOnly.orderNumber)).toBe('ready_to_pack')
  })
})

// ——— assignment ———

describe('assigning a blank', () => {
  let ticketId: number
  let otherTicketId: number
  // Two queued tickets of one paid order, made by the first test that needs them.
  async function twoTickets() {
    if (ticketId) return
    const product = await madeToOrderProduct('four_minute')
    const placed = await order(collector, [{ slug: product.slug, qty: 2 }])
    const tickets = await waitFor(async () => {
      const found = await ticketsOf(placed.orderNumber)
      return found.length === 2 ? found : null
    }, 10_000, 'tickets')
    ticketId = tickets[0].id
    otherTicketId = tickets[1].id
  }

  it('refuses a blank of the wrong format, an untested one and a failed one, each with its reason; the picker offers none of them', async () => {
    await twoTickets()
    const wrongFormat = await testedBlank('two_minute')
    const untested = await shavedBlank('four_minute')
    const failed = await testedBlank('four_minute', loudWav())
    const good = await testedBlank('four_minute', quietWav(11))

    const a = await assign(ticketId, wrongFormat)
    expect(a.status).toBe(409)
    expect(a.body.message).toMatch(new RegExp(`${wrongFormat} is a 2-minute blank; ticket #${ticketId} needs a 4-minute one`))
    const b = await assign(ticketId, untested)
    expect(b.status).toBe(409)
    expect(b.body.message).toMatch(/is shaved: only a blank whose current surface passed its test can be assigned/)
    const c = await assign(ticketId, failed)
    expect(c.status).toBe(409)
    expect(c.body.message).toMatch(/is tested: fail/)
    const missing = await assign(ticketId, 'GW-99-9999')
    expect(missing.status).toBe(404)
    expect(missing.body.data.fields).toHaveProperty('blankCode')

    const offer = await maker.get(`/api/workshop/tickets/${ticketId}/blanks`)
    expect(offer.status).toBe(200)
    const offered = offer.body.blanks.map((blank: any) => blank.code)
    expect(offered).toContain(good)
    for (const refused of [wrongFormat, untested, failed]) expect(offered).not.toContain(refused)
  })

  it('refuses a blank another open ticket holds, naming that ticket', async () => {
    await twoTickets()
    const code = await testedBlank('four_minute', quietWav(12))
    const first = await assign(ticketId, code)
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    expect(first.body).toMatchObject({ id: ticketId, stage: 'blank_assigned', blankCode: code })
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.body.blank.state).toBe('reserved')
    expect(dossier.body.holder).toMatchObject({ ticketId })

    const second = await assign(otherTicketId, code)
    expect(second.status).toBe(409)
    expect(second.body.message).toBe(`Blank ${code} is already held by ticket #${ticketId} (order ${(await maker.get(`/api/workshop/tickets/${ticketId}`)).body.order.number}).`)
    const offer = await maker.get(`/api/workshop/tickets/${otherTicketId}/blanks`)
    expect(offer.body.blanks.map((blank: any) => blank.code)).not.toContain(code)
  })

  it('20 concurrent assignments of one blank to 20 tickets: exactly one wins, the rest are told which ticket holds it', async () => {
    const product = await madeToOrderProduct('two_minute')
    const placed = await order(collector, [{ slug: product.slug, qty: 20 }])
    const tickets = await waitFor(async () => {
      const found = await ticketsOf(placed.orderNumber)
      return found.length === 20 ? found : null
    }, 10_000, '20 tickets')
    const code = await testedBlank('two_minute', quietWav(13))
    const answers = await Promise.all(tickets.map(ticket => assign(ticket.id, code)))
    const winners = answers.filter(answer => answer.status === 200)
    expect(winners).toHaveLength(1)
    const winner = winners[0]!.body.id as number
    const losers = answers.filter(answer => answer.status !== 200)
    expect(losers.map(answer => answer.status)).toEqual(Array(19).fill(409))
    for (const loser of losers) expect(loser.body.message).toMatch(new RegExp(`already held by ticket #${winner}\\b`))
    const after = await ticketsOf(placed.orderNumber)
    expect(after.filter(ticket => ticket.blankCode === code).map(ticket => ticket.id)).toEqual([winner])
  })
})

// ——— the life cycle ———

describe('the ticket life cycle', () => {
  it('no cut before a blank is assigned, no proof for a recorded cylinder, no done before the order ships; every change is logged', async () => {
    const product = await madeToOrderProduct('four_minute')
    const { placed, ticket } = await orderWithOneTicket(product)
    const id = ticket.id as number

    const early = await cut(id)
    expect(early.status).toBe(409)
    expect(early.body.message).toBe(`Ticket #${id} has no blank yet: assign a tested blank before recording the cut.`)
    const earlyByStage = await stage(id, 'cut')
    expect(earlyByStage.status).toBe(409)
    expect(earlyByStage.body.message).toMatch(/has no blank yet/)
    const skip = await stage(id, 'to_dispatch')
    expect(skip.status).toBe(409)
    expect(skip.body.message).toMatch(/is queued and cannot go to to dispatch/)

    const code = await testedBlank('four_minute', quietWav(21))
    expect((await assign(id, code)).status).toBe(200)
    const cutDone = await cut(id)
    expect(cutDone.status, JSON.stringify(cutDone.body)).toBe(200)
    expect(cutDone.body).toMatchObject({ stage: 'cut', blankCode: code, recorderName: 'Test Lathe' })

    const proof = await stage(id, 'proof_sent')
    expect(proof.status).toBe(409)
    expect(proof.body.message).toMatch(/recorded cylinder: it has no proof step/)
    const doneEarly = await stage(id, 'done')
    expect(doneEarly.status).toBe(409)
    expect(doneEarly.body.message).toMatch(/can be done only after it has gone to dispatch and the order has shipped/)

    const ready = await stage(id, 'to_dispatch', 'Labelled and boxed.')
    expect(ready.status).toBe(200)
    expect(await orderStatus(placed.orderNumber)).toBe('ready_to_pack')
    const doneBeforeShipping = await stage(id, 'done')
    expect(doneBeforeShipping.status).toBe(409)
    expect(doneBeforeShipping.body.message).toBe(`Ticket #${id} cannot be done before dispatch: its order is ready to pack, not shipped yet.`)

    const detail = await maker.get(`/api/workshop/tickets/${id}`)
    expect(detail.body.events.map((e: any) => `${e.from ?? '-'}→${e.to}`)).toEqual(['-→queued', 'queued→blank_assigned', 'blank_assigned→cut', 'cut→to_dispatch'])
    expect(detail.body.events.slice(1).every((e: any) => e.actor === account('maker').name)).toBe(true)
    expect(detail.body.events.at(-1).note).toBe('Labelled and boxed.')
  })

  it('a recut needs a reason, sends the ticket back to blank assigned and asks for a fresh blank; the order goes back into production', async () => {
    const product = await madeToOrderProduct('four_minute')
    const { placed, ticket } = await orderWithOneTicket(product)
    const first = await testedBlank('four_minute', quietWav(31))
    expect((await assign(ticket.id, first)).status).toBe(200)
    expect((await cut(ticket.id)).status).toBe(200)
    expect((await stage(ticket.id, 'to_dispatch')).status).toBe(200)
    expect(await orderStatus(placed.orderNumber)).toBe('ready_to_pack')

    const silent = await stage(ticket.id, 'recut')
    expect(silent.status).toBe(400)
    expect(silent.body.data.fields).toHaveProperty('note')
    const recut = await stage(ticket.id, 'recut', 'A scratch across the last turns.')
    expect(recut.status).toBe(200)
    expect(recut.body.stage).toBe('blank_assigned')
    expect(await orderStatus(placed.orderNumber)).toBe('in_production')
    const again = await cut(ticket.id)
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(new RegExp(`${first} carries the rejected cut`))

    const second = await testedBlank('four_minute', quietWav(32))
    const swapped = await assign(ticket.id, second)
    expect(swapped.status).toBe(200)
    expect((await cut(ticket.id)).status).toBe(200)
    const events = (await maker.get(`/api/workshop/tickets/${ticket.id}`)).body.events
    expect(events.map((e: any) => e.to)).toEqual(['queued', 'blank_assigned', 'cut', 'to_dispatch', 'blank_assigned', 'blank_assigned', 'cut'])

    // The board marks it as a recut, with the reason, and the stage filter finds it among the recuts.
    const [onBoard] = await ticketsOf(placed.orderNumber)
    expect(onBoard).toMatchObject({ id: ticket.id, stage: 'cut', recuts: 1, lastRecutNote: 'A scratch across the last turns.' })
    const recuts = await maker.get(`/api/workshop/tickets?stage=recut&q=${placed.orderNumber}`)
    expect(recuts.body.tickets.map((t: any) => t.id)).toEqual([ticket.id])
    const allRecuts = await maker.get('/api/workshop/tickets?stage=recut')
    expect(allRecuts.body.tickets.length).toBeGreaterThan(0)
    expect(allRecuts.body.tickets.every((t: any) => t.recuts > 0)).toBe(true)
    // A ticket cut once and never sent back carries no mark.
    const plain = await maker.get('/api/workshop/tickets?stage=queued')
    expect(plain.body.tickets.length).toBeGreaterThan(0)
    expect(plain.body.tickets.every((t: any) => t.stage === 'queued' && t.recuts === 0 && t.lastRecutNote === null)).toBe(true)
    expect(events[4].note).toBe('Recut: A scratch across the last turns.')
    expect(events[5].note).toBe(`Blank changed from ${first} to ${second}.`)
  })

  it('a ticket is due the shop\'s lead time after payment (Workshop figures › Production)', async () => {
    const settings = (await maker.get('/api/workshop/settings/engine')).body.settings
    try {
      expect((await maker.put('/api/workshop/settings/engine', { ...settings, production: { leadTimeDays: 3 } })).status).toBe(200)
      const product = await madeToOrderProduct('two_minute')
      const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10)
      const before = day(3)
      const { ticket } = await orderWithOneTicket(product)
      expect([before, day(3)]).toContain(ticket.dueDate)
    }
    finally {
      expect((await maker.put('/api/workshop/settings/engine', settings)).status).toBe(200)
    }
  })

  it('when every ticket of an order reaches dispatch, the order is ready to pack', async () => {
    const product = await madeToOrderProduct('two_minute')
    const placed = await order(collector, [{ slug: product.slug, qty: 2 }])
    const tickets = await waitFor(async () => {
      const found = await ticketsOf(placed.orderNumber)
      return found.length === 2 ? found : null
    }, 10_000, 'tickets')
    for (const [index, ticket] of tickets.entries()) {
      const code = await testedBlank('two_minute', quietWav(40 + index))
      expect((await assign(ticket.id, code)).status).toBe(200)
      expect((await cut(ticket.id)).status).toBe(200)
    }
    expect((await stage(tickets[0].id, 'to_dispatch')).status).toBe(200)
    expect(await orderStatus(placed.orderNumber)).toBe('in_production')
    expect((await stage(tickets[1].id, 'to_dispatch')).status).toBe(200)
    expect(await orderStatus(placed.orderNumber)).toBe('ready_to_pack')
    const timeline = (await maker.get(`/api/workshop/orders/${placed.orderNumber}`)).body.timeline.map((step: any) => step.to)
    expect(timeline).toEqual(['awaiting_payment', 'paid', 'in_production', 'ready_to_pack'])

    // The shipper's queue shows it: where it goes, what is in it, the packing; never what it cost.
    const shipper = await signedIn(account('shipper').email, account('shipper').password)
    const queue = await shipper.get('/api/dispatch/queue')
    expect(queue.status).toBe(200)
    const entry = queue.body.readyToPack.find((e: any) => e.number === placed.orderNumber)
    expect(entry).toMatchObject({ status: 'ready_to_pack', cylinders: 2, contents: [{ title: expect.stringMatching(/^Cut to order/), format: 'two_minute', quantity: 2 }] })
    expect(entry.shipTo.name).toBeTruthy()
    // Two cylinders, each in its own padded tube with ≥ 2 in of cushioning, double-boxed (carrier packing guidance).
    expect(entry.parcels).toHaveLength(1)
    expect(entry.parcels[0]).toMatchObject({ ok: true, cylinders: 2 })
    expect(entry.parcels[0].innerBox).toBeTruthy()
    expect(entry.parcels[0].billableWeightG).toBeGreaterThanOrEqual(entry.parcels[0].actualWeightG)
    expect(JSON.stringify(queue.body)).not.toMatch(/Minor|price|total|payment/i)
    expect((await collector.get('/api/dispatch/queue')).status).toBe(403)
    expect((await new Client().get('/api/dispatch/queue')).status).toBe(401)
  })
})

// ——— recorders and test cuts ———

describe('recorders and test cuts', () => {
  it('a test cut is stored with the audio engine\'s figures for the same file, and the ranking follows the quieter recorder', async () => {
    const quieter = await maker.post('/api/workshop/recorders', { name: `Quiet One ${counter}`, stylus: 'sapphire' })
    expect(quieter.status).toBe(201)
    const duplicate = await maker.post('/api/workshop/recorders', { name: `Quiet One ${counter}` })
    expect(duplicate.status).toBe(409)
    expect(duplicate.body.data.fields).toHaveProperty('name')

    const noisyWav = makeSurfaceWav({ seconds: 5, sampleRate: 22_050, levelDbfs: -49, seed: 51 })
    const calmWav = makeSurfaceWav({ seconds: 5, sampleRate: 22_050, levelDbfs: -57, seed: 52 })
    const noisy = await upload(maker, '/api/workshop/test-cuts', { name: 'noisy.wav', bytes: noisyWav }, { recorderId: String(recorderId), notes: 'noisy' })
    expect(noisy.status, JSON.stringify(noisy.body)).toBe(201)
    const calm = await upload(maker, '/api/workshop/test-cuts', { name: 'calm.wav', bytes: calmWav }, { recorderId: String(quieter.body.id) })
    expect(calm.status).toBe(201)
    const expected = analyseSurfaceWav(calmWav, { rpm: 160, thresholds: surfaceThresholdsSchema.parse({}) })
    const stored = await maker.get(`/api/workshop/test-cuts/${calm.body.id}`)
    expect(stored.status).toBe(200)
    expect(stored.body.aWeightedDbfs).toBe(expected.aWeightedDbfs)
    expect(stored.body.clicksPerMinute).toBe(expected.clicksPerMinute)
    expect(stored.body.figures.rmsDbfs).toBe(expected.rmsDbfs)
    expect(stored.body.verdict).toBe(expected.verdict)

    const refused = await upload(maker, '/api/workshop/test-cuts', { name: 'not.wav', bytes: new TextEncoder().encode('<svg></svg>') }, { recorderId: String(recorderId) })
    expect(refused.status).toBe(415)
    const noRecorder = await upload(maker, '/api/workshop/test-cuts', { name: 'calm.wav', bytes: calmWav }, { recorderId: '999999' })
    expect(noRecorder.status).toBe(404)
    expect(noRecorder.body.data.fields).toHaveProperty('recorderId')

    const list = await maker.get('/api/workshop/recorders')
    expect(list.status).toBe(200)
    const names = list.body.recorders.filter((r: any) => r.rank !== null).map((r: any) => r.name)
    expect(names.indexOf(`Quiet One ${counter}`)).toBeLessThan(names.indexOf('Test Lathe'))
    expect(list.body.suggested.name).toBe(`Quiet One ${counter}`)
    const page = await maker.get(`/api/workshop/recorders/${recorderId}`)
    expect(page.body.cuts.at(-1)).toMatchObject({ notes: 'noisy' })
  })

  it('the dashboard answers with its sections', async () => {
    const board = await maker.get('/api/workshop/dashboard')
    expect(board.status).toBe(200)
    expect(board.body.ticketsPerStage.map((row: any) => row.stage)).toEqual(['queued', 'blank_assigned', 'cut', 'proof_sent', 'approved', 'to_dispatch', 'done'])
    expect(board.body.ticketsPerStage.find((row: any) => row.stage === 'queued').count).toBeGreaterThan(0)
    expect(board.body.blanksReady.map((row: any) => row.format)).toEqual(['two_minute', 'four_minute'])
    expect(board.body.yieldPerBatch.find((batch: any) => batch.code === 'TK-26-01')).toMatchObject({ tested: expect.any(Number), passed: expect.any(Number) })
    expect(board.body.revenue.byCurrency[0].paidMinor).toBeGreaterThan(0)
  })
})

// ——— the certificate ———

describe('the test certificate', () => {
  it('opens for the owner, the maker and a guest with the order link; anyone else and a cylinder not cut yet get 404', async () => {
    const product = await madeToOrderProduct('four_minute')
    const { placed, ticket } = await orderWithOneTicket(product)
    expect((await collector.get(`/api/certificates/${ticket.id}`)).status).toBe(404)

    const code = await testedBlank('four_minute', quietWav(61))
    expect((await assign(ticket.id, code)).status).toBe(200)
    expect((await cut(ticket.id)).status).toBe(200)

    const owner = await collector.get(`/api/certificates/${ticket.id}`)
    expect(owner.status).toBe(200)
    expect(owner.body).toMatchObject({ ticketId: ticket.id, orderNumber: placed.orderNumber, blank: { code, surface: 1 }, batch: { code: 'TK-26-01' }, recorder: { name: 'Test Lathe' } })
    expect(owner.body.surfaceTest.finalVerdict).toBe('pass')
    expect(owner.body.surfaceTest.aWeightedDbfs).toBeLessThan(-50)
    expect((await maker.get(`/api/certificates/${ticket.id}`)).status).toBe(200)
    expect((await new Client().get(`/api/certificates/${ticket.id}?t=${placed.accessToken}`)).status).toBe(200)
    const listed = await collector.get(`/api/certificates?order=${placed.orderNumber}`)
    expect(listed.body.certificates.map((c: any) => c.ticketId)).toEqual([ticket.id])

    const stranger = new Client()
    const registered = await stranger.post('/api/auth/register', { name: 'Perrin Gall', email: `perrin-${Date.now()}@collectors.test`, password: 'a-long-and-unusual-phrase' })
    expect(registered.status, JSON.stringify(registered.body)).toBeLessThan(300)
    expect((await stranger.get(`/api/certificates/${ticket.id}`)).status).toBe(404)
    expect((await stranger.get(`/api/certificates?order=${placed.orderNumber}`)).status).toBe(404)
    expect((await new Client().get(`/api/certificates/${ticket.id}`)).status).toBe(404)
    expect((await new Client().get(`/api/certificates/${ticket.id}?t=not-the-token`)).status).toBe(404)
    const shipper = await signedIn(account('shipper').email, account('shipper').password)
    expect((await shipper.get(`/api/certificates/${ticket.id}`)).status).toBe(404)
  })
})

// ——— the board: stage filter and pages (issue 6) ———

describe('the ticket board', () => {
  it('filters by stage, refuses an unknown stage naming it, and pages with the total instead of cutting off', async () => {
    const product = await madeToOrderProduct('two_minute')
    const placed = await order(collector, [{ slug: product.slug, qty: 3 }])
    const tickets = await waitFor(async () => {
      const found = await ticketsOf(placed.orderNumber)
      return found.length === 3 ? found : null
    }, 10_000, 'three tickets')
    const code = await testedBlank('two_minute', quietWav(71))
    expect((await assign(tickets[0].id, code)).status).toBe(200)

    const assigned = await maker.get(`/api/workshop/tickets?stage=blank_assigned&q=${placed.orderNumber}`)
    expect(assigned.status).toBe(200)
    expect(assigned.body.tickets.map((t: any) => t.id)).toEqual([tickets[0].id])
    expect(assigned.body.total).toBe(1)
    const queued = await maker.get(`/api/workshop/tickets?stage=queued&q=${placed.orderNumber}`)
    expect(queued.body.tickets.map((t: any) => t.id).sort()).toEqual([tickets[1].id, tickets[2].id].sort())

    const bad = await maker.get('/api/workshop/tickets?stage=polished')
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields).toHaveProperty('stage')
    expect((await maker.get('/api/workshop/tickets?pageSize=501')).body.data.fields).toHaveProperty('pageSize')

    // Two a page: the first page says 2 of 3, the second holds the last one, and together they are all three.
    const first = await maker.get(`/api/workshop/tickets?q=${placed.orderNumber}&pageSize=2`)
    expect(first.body).toMatchObject({ total: 3, page: 1, pageSize: 2 })
    expect(first.body.tickets).toHaveLength(2)
    const second = await maker.get(`/api/workshop/tickets?q=${placed.orderNumber}&pageSize=2&page=2`)
    expect(second.body).toMatchObject({ total: 3, page: 2 })
    expect(second.body.tickets).toHaveLength(1)
    expect([...first.body.tickets, ...second.body.tickets].map((t: any) => t.id).sort()).toEqual(tickets.map(t => t.id).sort())

    // The whole board: its total counts every ticket, even beyond one page.
    const whole = await maker.get('/api/workshop/tickets?pageSize=1')
    expect(whole.body.tickets).toHaveLength(1)
    expect(whole.body.total).toBeGreaterThan(3)
  })
})

// ——— test cuts on a blank (issue 6) ———

describe('a test cut on a blank', () => {
  const testCut = (blankCode: string, seed = 81) => upload(maker, '/api/workshop/test-cuts', { name: 'cut.wav', bytes: makeSurfaceWav({ seconds: 5, sampleRate: 22_050, levelDbfs: -55, seed }) }, { recorderId: String(recorderId), blankCode })
  const blankOf = async (code: string) => (await maker.get(`/api/workshop/blanks/${code}`)).body
  const cutsOfRecorder = async () => (await maker.get(`/api/workshop/test-cuts?recorderId=${recorderId}&limit=200`)).body.cuts.length as number

  it('uses the surface of a tested blank: the blank goes to cut, its history says which cut, and no ticket is offered it', async () => {
    const product = await madeToOrderProduct('four_minute')
    const { ticket } = await orderWithOneTicket(product)
    const code = await testedBlank('four_minute', quietWav(82))
    expect((await maker.get(`/api/workshop/tickets/${ticket.id}/blanks?q=${code}`)).body.blanks.map((b: any) => b.code)).toEqual([code])

    const made = await testCut(code)
    expect(made.status, JSON.stringify(made.body)).toBe(201)
    expect(made.body).toMatchObject({ blankCode: code, blankState: 'cut' })
    const dossier = await blankOf(code)
    expect(dossier.blank).toMatchObject({ state: 'cut', surfacesUsed: 0 })
    expect(dossier.testCuts.map((c: any) => c.id)).toEqual([made.body.id])
    expect(dossier.history.at(-1)).toMatchObject({ kind: 'state', by: account('maker').name, data: { from: 'tested_pass', to: 'cut', testCutId: made.body.id } })
    expect(dossier.history.at(-1).data.reason).toMatch(new RegExp(`^Test cut #${made.body.id} with Test Lathe on surface 1`))

    expect((await maker.get(`/api/workshop/tickets/${ticket.id}/blanks?q=${code}`)).body.blanks).toEqual([])
    const refused = await assign(ticket.id, code)
    expect(refused.status).toBe(409)
    expect(refused.body.message).toMatch(/is cut: only a blank whose current surface passed its test/)

    // A second cut on the same surface is refused; a reshave gives a fresh surface, which takes one again.
    const before = await cutsOfRecorder()
    const again = await testCut(code, 83)
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(new RegExp(`^${code} \\(cut\\): .*already carries a cut`))
    expect(again.body.data.fields).toHaveProperty('blankCode')
    expect(await cutsOfRecorder()).toBe(before)
    const reshaved = await maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 1, reason: 'test groove' })
    expect(reshaved.status, JSON.stringify(reshaved.body)).toBe(201)
    expect(reshaved.body).toMatchObject({ state: 'shaved', surfacesUsed: 1 })
    expect((await testCut(code, 84)).status).toBe(201)
    expect((await blankOf(code)).blank).toMatchObject({ state: 'cut', surfacesUsed: 1 })
  })

  it('refuses a blank reserved for a customer\'s ticket, a cast and a scrapped one, naming the state; nothing is stored or changed', async () => {
    const product = await madeToOrderProduct('four_minute')
    const { placed, ticket } = await orderWithOneTicket(product)
    const reserved = await testedBlank('four_minute', quietWav(85))
    expect((await assign(ticket.id, reserved)).status).toBe(200)
    const created = await maker.post('/api/workshop/blanks', { batchId, format: 'four_minute', count: 2, diameterIn: '2.206' })
    const [cast, scrapped] = created.body.codes as string[]
    expect((await maker.post(`/api/workshop/blanks/${scrapped}/scrap`, { reason: 'Cracked in the mould.' })).status).toBe(200)

    const before = await cutsOfRecorder()
    const cases: [string, string, RegExp][] = [
      [reserved!, 'reserved', new RegExp(`reserved for ticket #${ticket.id} \\(order ${placed.orderNumber}\\)`)],
      [cast!, 'cast', /needs a shaved surface; this blank is cast/],
      [scrapped!, 'scrapped', /is scrapped/],
    ]
    for (const [code, state, message] of cases) {
      const answer = await testCut(code)
      expect(answer.status, `${state}: ${JSON.stringify(answer.body)}`).toBe(409)
      expect(answer.body.message).toMatch(new RegExp(`^${code} \\(${state}\\): `))
      expect(answer.body.message).toMatch(message)
      expect(answer.body.data).toMatchObject({ state, action: 'testCut' })
      expect((await blankOf(code)).blank.state).toBe(state)
    }
    expect(await cutsOfRecorder()).toBe(before)
    expect((await blankOf(reserved!)).holder).toMatchObject({ ticketId: ticket.id })

    const missing = await testCut('GW-99-9999')
    expect(missing.status).toBe(404)
    expect(missing.body.data.fields).toHaveProperty('blankCode')
  })
})
