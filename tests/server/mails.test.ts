import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { defaultUnitPreferences } from '../../shared/utils/unitFormat'
import { Client, signedIn, useTestServer, waitFor } from './harness'

// The mails an order's life sends, read from the fake inbox: each arrives once however often the change
// that causes it is repeated (a duplicated webhook, a re-cut, a retried card).
const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-mail-uploads-'))
const env = await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })
const payments = env.payments
const account = (role: string) => demoAccounts.find(a => a.role === role)!
const makerEmail = account('maker').email
let maker: Client
let batchId: number
let recorderId: number
let counter = 0

const address = { name: 'Tamsin Orrell', line1: '4 Wick Lane', city: 'Lowmere', postalCode: '97001', region: 'OR', country: 'US' }

beforeAll(async () => {
  maker = await signedIn(makerEmail, account('maker').password)
  // Short synthetic takes stand for full-length ones here (the coverage rule has tests of its own).
  expect((await maker.put('/api/workshop/settings/surface', { coveragePercent: 1 })).status).toBe(200)
  const batch = await maker.post('/api/workshop/batches', { code: `ML-${Date.now() % 100000}`, formula: 'stearic acid 75 / paraffin 25', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075 })
  expect(batch.status, JSON.stringify(batch.body)).toBe(201)
  batchId = batch.body.id
  const recorder = await maker.post('/api/workshop/recorders', { name: 'Mail Lathe', stylus: 'sapphire', horn: 'brass, 24 in' })
  expect(recorder.status, JSON.stringify(recorder.body)).toBe(201)
  recorderId = recorder.body.id
})

async function fake(path: string, body?: unknown) {
  const response = await fetch(`${payments.url}${path}`, { method: body === undefined ? 'GET' : 'POST', headers: { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) })
  return await response.json() as any
}

/** The due date after the shop's default lead time of 10 days, as a locale writes a long date. */
const dueIn = (locale: string) => new Date(Date.now() + 10 * 86_400_000).toLocaleDateString(locale, { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' })
const mailsTo = (to: string, subject: string) => env.fake.list().filter(m => m.to.includes(to) && m.subject.includes(subject))
/** Lets the mail loop make several more passes, so a second copy would have arrived. */
const settle = () => new Promise(resolve => setTimeout(resolve, 800))

async function product(madeToOrder: boolean) {
  const answer = await maker.post('/api/workshop/products', {
    slug: `mail-${Date.now()}-${++counter}`, title: `Mail cylinder ${counter}`, kind: madeToOrder ? 'recorded' : 'blank', performer: madeToOrder ? 'The Test Quartet' : undefined, runningTimeS: madeToOrder ? 100 : undefined,
    format: 'four_minute', material: 'hard stearic wax', priceMinor: 3000, stock: 20, madeToOrder,
  })
  expect(answer.status, JSON.stringify(answer.body)).toBe(201)
  return answer.body as { slug: string, title: string }
}

async function checkout(items: { slug: string, qty: number }[]) {
  const email = `mail-${Date.now()}-${++counter}@collectors.test`
  const created = await new Client().post('/api/checkout', { items, email, shippingAddress: address })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  return { email, orderNumber: created.body.orderNumber as string, session: (created.body.url as string).split('/').pop()!, accessToken: created.body.accessToken as string }
}

async function pay(placed: { session: string, orderNumber: string }) {
  const completed = await fake(`/_fake/sessions/${placed.session}/complete?wait=true`, {})
  await waitFor(async () => (await maker.get(`/api/workshop/orders/${placed.orderNumber}`)).body.status !== 'awaiting_payment', 10_000, 'the order to be paid')
  return completed.event.id as string
}

async function testedBlank(seed: number): Promise<string> {
  const created = await maker.post('/api/workshop/blanks', { batchId, format: 'four_minute', count: 1, diameterIn: '2.206' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const code = created.body.codes[0] as string
  expect((await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
  expect((await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)
  const form = new FormData()
  form.append('file', new Blob([makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed })], { type: 'audio/wav' }), `${code}.wav`)
  const target = url(`/api/workshop/blanks/${code}/surface-tests`)
  const response = await fetch(target, { method: 'POST', body: form, headers: { origin: new URL(target).origin, accept: 'application/json', cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
  expect(response.status, await response.clone().text()).toBe(201)
  return code
}

describe('the maker hears of every paid order, once', () => {
  it('an order with cylinders to make: what to make and the due date, to the maker; a repeated webhook sends no second mail', async () => {
    const made = await product(true)
    const stock = await product(false)
    const placed = await checkout([{ slug: made.slug, qty: 2 }, { slug: stock.slug, qty: 1 }])
    const eventId = await pay(placed)
    const mail = await waitFor(async () => mailsTo(makerEmail, `Paid order ${placed.orderNumber}`)[0], 10_000, 'the maker\'s mail')
    expect(mail.subject).toBe(`Paid order ${placed.orderNumber}: 2 cylinders to make`)
    expect(mail.text).toContain(`2 × ${made.title} — due `)
    expect(mail.text).toContain(`1 × ${stock.title}`)
    // Due after the shop's lead time (10 days by default), in the shop's locale (en-US unless the maker chose another).
    expect(mail.text).toContain(dueIn(defaultUnitPreferences.locale))
    await fake(`/_fake/events/${eventId}/duplicate`, { times: 3 })
    await waitFor(async () => (await fake(`/_fake/deliveries?event=${eventId}`)).data.filter((d: any) => d.status === 200).length >= 4, 10_000, 'the duplicates')
    await settle()
    expect(mailsTo(makerEmail, `Paid order ${placed.orderNumber}`)).toHaveLength(1)
  })

  it('writes its dates in the locale the maker chooses in Shop settings, from the next mail on', async () => {
    const before = (await maker.get('/api/shop/units')).body
    expect(before.locale).toBe(defaultUnitPreferences.locale)
    const switched = await maker.put('/api/workshop/settings/units', { ...before, locale: 'en-GB' })
    expect(switched.status, JSON.stringify(switched.body)).toBe(200)
    try {
      const made = await product(true)
      const placed = await checkout([{ slug: made.slug, qty: 1 }])
      await pay(placed)
      const mail = await waitFor(async () => mailsTo(makerEmail, `Paid order ${placed.orderNumber}`)[0], 10_000, 'the maker\'s mail')
      // en-GB writes the day before the month: "14 December 2026"; en-US "December 14, 2026".
      expect(mail.text).toContain(dueIn('en-GB'))
      expect(mail.text).not.toContain(dueIn('en-US'))
    }
    finally {
      expect((await maker.put('/api/workshop/settings/units', before)).status).toBe(200)
    }
  })

  it('a stock-only order goes straight to packing, and the maker is told it is to pack', async () => {
    const stock = await product(false)
    const placed = await checkout([{ slug: stock.slug, qty: 1 }])
    await pay(placed)
    expect((await maker.get(`/api/workshop/orders/${placed.orderNumber}`)).body.status).toBe('ready_to_pack')
    const mail = await waitFor(async () => mailsTo(makerEmail, `Paid order ${placed.orderNumber}`)[0], 10_000, 'the maker\'s mail')
    expect(mail.subject).toBe(`Paid order ${placed.orderNumber}: to pack`)
    expect(mail.text).toMatch(/packing queue/)
    await settle()
    expect(mailsTo(makerEmail, `Paid order ${placed.orderNumber}`)).toHaveLength(1)
  })
})

describe('the customer hears when a cylinder made for them is cut', () => {
  it('once per order item, with the dispatch due date, even when it is cut again', async () => {
    const made = await product(true)
    const placed = await checkout([{ slug: made.slug, qty: 1 }])
    await pay(placed)
    const [ticket] = await waitFor(async () => {
      const found = (await maker.get(`/api/workshop/tickets?q=${placed.orderNumber}`)).body.tickets as any[]
      return found.length === 1 ? found : null
    }, 10_000, 'the ticket')
    expect(mailsTo(placed.email, 'has been cut')).toHaveLength(0)
    const assigned = await maker.post(`/api/workshop/tickets/${ticket.id}/assign`, { blankCode: await testedBlank(41) })
    expect(assigned.status, JSON.stringify(assigned.body)).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/cut`, { recorderId })).status).toBe(200)
    const mail = await waitFor(async () => mailsTo(placed.email, 'has been cut')[0], 10_000, 'the cut mail')
    expect(mail.subject).toBe(`Your cylinder has been cut (order ${placed.orderNumber})`)
    expect(mail.text).toContain(made.title)
    // In the shop's default locale (en-US): "Monday, December 14, 2026".
    expect(mail.text.replace(/\s+/g, ' ')).toMatch(/ready for dispatch by \w+day, \w+ \d{1,2}, \d{4}/)

    // Cut again after a recut: no second mail.
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/stage`, { to: 'recut', note: 'A scratch on the last turns.' })).status).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/assign`, { blankCode: await testedBlank(42) })).status).toBe(200)
    expect((await maker.post(`/api/workshop/tickets/${ticket.id}/cut`, { recorderId })).status).toBe(200)
    await settle()
    expect(mailsTo(placed.email, 'has been cut')).toHaveLength(1)
  })
})

describe('a declined card', () => {
  it('retried and paid on the same page: no "did not go through" mail at all', async () => {
    const stock = await product(false)
    const placed = await checkout([{ slug: stock.slug, qty: 1 }])
    await fake(`/_fake/sessions/${placed.session}/decline?wait=true`, {})
    await pay(placed)
    await settle()
    expect(mailsTo(placed.email, 'did not go through')).toHaveLength(0)
    expect(mailsTo(placed.email, 'is paid')).toHaveLength(1)
  })

  it('left unpaid: one mail once the page expires, none before; a repeated expiry sends no second', async () => {
    const stock = await product(false)
    const placed = await checkout([{ slug: stock.slug, qty: 1 }])
    await fake(`/_fake/sessions/${placed.session}/decline?wait=true`, {})
    await fake(`/_fake/sessions/${placed.session}/decline?wait=true`, {})
    await settle()
    expect(mailsTo(placed.email, 'did not go through')).toHaveLength(0)
    await fake(`/_fake/sessions/${placed.session}/expire?wait=true`, {})
    const mail = await waitFor(async () => mailsTo(placed.email, 'did not go through')[0], 10_000, 'the declined mail')
    expect(mail.text).toMatch(/declined/)
    expect(mail.text).toMatch(/Nothing was charged/)
    await fake('/_fake/events', { type: 'checkout.session.expired', objectId: placed.session, patch: { status: 'expired' } })
    await settle()
    expect(mailsTo(placed.email, 'did not go through')).toHaveLength(1)
  })

  it('an order given up without a decline sends no such mail', async () => {
    const stock = await product(false)
    const placed = await checkout([{ slug: stock.slug, qty: 1 }])
    await fake(`/_fake/sessions/${placed.session}/expire?wait=true`, {})
    await waitFor(async () => (await maker.get(`/api/workshop/orders/${placed.orderNumber}`)).body.status === 'cancelled', 10_000, 'the release')
    await settle()
    expect(mailsTo(placed.email, 'did not go through')).toHaveLength(0)
  })
})
