// The payment stand-in (fakes/stripe), driven through the real `stripe` SDK the app uses, with a tiny
// local webhook receiver that checks signatures with the SDK's own `constructEvent`.
import { createServer, type Server } from 'node:http'
import Stripe from 'stripe'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { startStripeFake, type StripeFake } from '../../fakes/stripe/server'

const SECRET = 'whsec_unit_test_secret'

interface Received { body: string, signature: string, event: Stripe.Event }

let fake: StripeFake
let receiver: Server
let receiverUrl: string
let stripe: Stripe
const received: Received[] = []
/** Status codes the receiver answers next, one per request; 200 when empty. */
const answers: number[] = []

async function waitFor<T>(probe: () => T | undefined | false, timeoutMs = 3000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = probe()
    if (value) return value
    if (Date.now() > deadline) throw new Error('timed out waiting')
    await new Promise(resolve => setTimeout(resolve, 10))
  }
}

const deliveredOf = (predicate: (event: Stripe.Event) => boolean) => received.filter(item => predicate(item.event))

async function control(method: 'GET' | 'POST', path: string, body?: unknown) {
  const response = await fetch(`${fake.url}${path}`, {
    method,
    headers: { 'content-type': 'application/json' },
    ...(body === undefined ? {} : { body: JSON.stringify(body) }),
  })
  return { status: response.status, json: await response.json() as any }
}

function sessionParams(overrides: Partial<Stripe.Checkout.SessionCreateParams> = {}): Stripe.Checkout.SessionCreateParams {
  return {
    mode: 'payment',
    line_items: [
      { price_data: { currency: 'gbp', unit_amount: 1850, product_data: { name: 'Brown wax blank, 2-minute' } }, quantity: 2 },
      { price_data: { currency: 'gbp', unit_amount: 2400, product_data: { name: 'The Lantern Waltz (4-minute)' } }, quantity: 1 },
    ],
    success_url: 'http://127.0.0.1:3999/checkout/success?session_id={CHECKOUT_SESSION_ID}',
    cancel_url: 'http://127.0.0.1:3999/cart',
    customer_email: 'collector@example.test',
    client_reference_id: 'GW-1001',
    metadata: { order: 'GW-1001' },
    payment_intent_data: { metadata: { order: 'GW-1001' } },
    ...overrides,
  }
}

beforeAll(async () => {
  receiver = createServer((req, res) => {
    const chunks: Buffer[] = []
    req.on('data', (chunk: Buffer) => chunks.push(chunk))
    req.on('end', () => {
      const body = Buffer.concat(chunks).toString('utf8')
      const status = answers.shift() ?? 200
      if (status === 200) {
        received.push({ body, signature: String(req.headers['stripe-signature']), event: JSON.parse(body) })
      }
      res.writeHead(status, { 'content-type': 'application/json' })
      res.end('{}')
    })
  })
  await new Promise<void>(resolve => receiver.listen(0, '127.0.0.1', () => resolve()))
  const address = receiver.address()
  receiverUrl = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}/api/webhooks/stripe`
  fake = await startStripeFake({ port: 0, webhookUrl: receiverUrl, webhookSecret: SECRET, quiet: true, retry: { attempts: 4, baseMs: 40 }, expireSweepMs: 50 })
  stripe = new Stripe('sk_test_unit_1234567890', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 })
})

afterAll(async () => {
  await fake?.close()
  await new Promise<void>(resolve => receiver ? receiver.close(() => resolve()) : resolve())
})

describe('checkout sessions through the SDK', () => {
  it('binds a free port when asked for port 0', () => {
    expect(fake.port).toBeGreaterThan(0)
    expect(fake.url).toBe(`http://127.0.0.1:${fake.port}`)
  })

  it('creates a session once per idempotency key and retrieves it', async () => {
    const first = await stripe.checkout.sessions.create(sessionParams(), { idempotencyKey: 'order-GW-1001' })
    const again = await stripe.checkout.sessions.create(sessionParams(), { idempotencyKey: 'order-GW-1001' })
    expect(again.id).toBe(first.id)
    expect(first.id).toMatch(/^cs_test_/)
    expect(first).toMatchObject({
      object: 'checkout.session',
      status: 'open',
      payment_status: 'unpaid',
      amount_subtotal: 2 * 1850 + 2400,
      amount_total: 6100,
      currency: 'gbp',
      metadata: { order: 'GW-1001' },
      client_reference_id: 'GW-1001',
      customer_email: 'collector@example.test',
      payment_intent: null,
      livemode: false,
      url: `${fake.url}/pay/${first.id}`,
    })
    expect(first.expires_at - first.created).toBe(24 * 3600)

    await expect(stripe.checkout.sessions.create(sessionParams({ client_reference_id: 'GW-other' }), { idempotencyKey: 'order-GW-1001' }))
      .rejects.toBeInstanceOf(Stripe.errors.StripeIdempotencyError)

    const fetched = await stripe.checkout.sessions.retrieve(first.id)
    expect(fetched.id).toBe(first.id)
    const items = await stripe.checkout.sessions.listLineItems(first.id)
    expect(items.data.map(item => [item.description, item.quantity, item.amount_total])).toEqual([
      ['Brown wax blank, 2-minute', 2, 3700],
      ['The Lantern Waltz (4-minute)', 1, 2400],
    ])
    const list = await stripe.checkout.sessions.list({ limit: 100 })
    expect(list.object).toBe('list')
    expect(list.data.some(session => session.id === first.id)).toBe(true)
  })

  it('completes a session: a signed checkout.session.completed the SDK verifies, a succeeded payment intent', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const { status, json } = await control('POST', `/_fake/sessions/${session.id}/complete`)
    expect(status).toBe(200)
    const eventId = json.event.id as string
    const delivered = await waitFor(() => received.find(item => item.event.id === eventId))

    const event = stripe.webhooks.constructEvent(delivered.body, delivered.signature, SECRET)
    expect(event.type).toBe('checkout.session.completed')
    expect(event).toMatchObject({ object: 'event', livemode: false, api_version: expect.any(String), request: { id: null } })
    const object = event.data.object as Stripe.Checkout.Session
    expect(object).toMatchObject({ id: session.id, status: 'complete', payment_status: 'paid', metadata: { order: 'GW-1001' } })
    expect(() => stripe.webhooks.constructEvent(delivered.body, delivered.signature, 'whsec_wrong'))
      .toThrow(Stripe.errors.StripeSignatureVerificationError)
    expect(() => stripe.webhooks.constructEvent(delivered.body.replace('"paid"', '"unpaid"'), delivered.signature, SECRET))
      .toThrow(Stripe.errors.StripeSignatureVerificationError)

    const intent = await stripe.paymentIntents.retrieve(object.payment_intent as string)
    expect(intent).toMatchObject({ status: 'succeeded', amount: 6100, amount_received: 6100, currency: 'gbp' })
    expect(intent.metadata).toEqual({ order: 'GW-1001', checkout_session: session.id })
    expect(intent.latest_charge).toMatch(/^ch_/)

    const retrieved = await stripe.checkout.sessions.retrieve(session.id, { expand: ['payment_intent'] })
    expect((retrieved.payment_intent as Stripe.PaymentIntent).id).toBe(intent.id)
    expect(retrieved.url).toBeNull()

    const fromApi = await stripe.events.retrieve(eventId)
    expect(fromApi.type).toBe('checkout.session.completed')
    const listed = await stripe.events.list({ type: 'checkout.session.completed' })
    expect(listed.data.map(item => item.id)).toContain(eventId)
  })

  it('refunds part then the rest, with cumulative charge.refunded events, and refuses more', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams({ metadata: { order: 'GW-1002' }, payment_intent_data: { metadata: { order: 'GW-1002' } } }))
    const { json } = await control('POST', `/_fake/sessions/${session.id}/complete`)
    const intentId = json.payment_intent.id as string

    const part = await stripe.refunds.create({ payment_intent: intentId, amount: 1000, reason: 'requested_by_customer', metadata: { note: 'scratched' } }, { idempotencyKey: 'refund-1' })
    expect(part).toMatchObject({ object: 'refund', status: 'succeeded', amount: 1000, payment_intent: intentId, metadata: { note: 'scratched' } })
    expect(part.id).toMatch(/^re_/)
    const rest = await stripe.refunds.create({ payment_intent: intentId })
    expect(rest.amount).toBe(5100)

    await expect(stripe.refunds.create({ payment_intent: intentId, amount: 1 })).rejects.toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)

    const refundEvents = await waitFor(() => {
      const found = deliveredOf(event => event.type === 'charge.refunded' && (event.data.object as Stripe.Charge).payment_intent === intentId)
      return found.length === 2 && found
    })
    const charges = refundEvents.map(item => item.event.data.object as Stripe.Charge).sort((a, b) => a.amount_refunded - b.amount_refunded)
    expect(charges.map(charge => [charge.amount_refunded, charge.refunded])).toEqual([[1000, false], [6100, true]])
    expect(charges[1]!.metadata).toMatchObject({ order: 'GW-1002' })
    expect(charges[1]!.refunds!.data).toHaveLength(2)

    const listed = await stripe.refunds.list({ payment_intent: intentId })
    expect(listed.data.map(refund => refund.amount).sort()).toEqual([1000, 5100])
    expect((await stripe.refunds.retrieve(part.id)).amount).toBe(1000)
  })

  it('refuses a refund larger than what remains', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const { json } = await control('POST', `/_fake/sessions/${session.id}/complete`)
    const error = await stripe.refunds.create({ payment_intent: json.payment_intent.id, amount: 99_999 }).catch(caught => caught)
    expect(error).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(error.param).toBe('amount')
    expect(error.statusCode).toBe(400)
  })

  it('expires an open session once, with checkout.session.expired', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const expired = await stripe.checkout.sessions.expire(session.id)
    expect(expired.status).toBe('expired')
    const event = await waitFor(() => received.find(item => item.event.type === 'checkout.session.expired' && (item.event.data.object as Stripe.Checkout.Session).id === session.id))
    expect(event.event.request?.id).toMatch(/^req_/)
    await expect(stripe.checkout.sessions.expire(session.id)).rejects.toThrow(/Only Checkout Sessions with a status in \["open"\] can be expired/)
  })
  it('expires an open session by itself once expires_at has passed', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams({ expires_at: Math.floor(Date.now() / 1000) + 30 * 60 }))
    vi.useFakeTimers({ toFake: ['Date'] })
    try {
      vi.setSystemTime(Date.now() + 31 * 60_000)
      const event = await waitFor(() => received.find(item => item.event.type === 'checkout.session.expired' && (item.event.data.object as Stripe.Checkout.Session).id === session.id))
      expect(event.event.request).toEqual({ id: null, idempotency_key: null })
    }
    finally {
      vi.useRealTimers()
    }
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('expired')
    const page = await (await fetch(`${fake.url}/pay/${session.id}`)).text()
    expect(page).toContain('expired')
    expect(page).not.toContain('<button')
  })
})

describe('webhook delivery', () => {
  it('retries after a 500 and delivers the same event', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    answers.push(500)
    const { json } = await control('POST', `/_fake/sessions/${session.id}/complete`)
    const eventId = json.event.id as string
    await waitFor(() => received.find(item => item.event.id === eventId))
    const { json: log } = await control('GET', `/_fake/deliveries?event=${eventId}`)
    expect(log.data.map((entry: any) => [entry.attempt, entry.status])).toEqual([[1, 500], [2, 200]])
    const { json: events } = await control('GET', '/_fake/events')
    expect(events.data.find((entry: any) => entry.id === eventId).delivery).toBe('delivered')
  })

  it('holds events and delivers them in the order asked', async () => {
    const a = await stripe.checkout.sessions.create(sessionParams())
    const b = await stripe.checkout.sessions.create(sessionParams())
    const completed = (await control('POST', `/_fake/sessions/${a.id}/complete?deliver=false`)).json.event.id as string
    const expired = (await control('POST', `/_fake/sessions/${b.id}/expire?deliver=false`)).json.event.id as string
    await new Promise(resolve => setTimeout(resolve, 50))
    expect(received.some(item => item.event.id === completed || item.event.id === expired)).toBe(false)

    const { json } = await control('POST', '/_fake/deliver', { eventIds: [expired, completed] })
    expect(json.attempts.map((entry: any) => entry.status)).toEqual([200, 200])
    const order = received.filter(item => item.event.id === completed || item.event.id === expired).map(item => item.event.id)
    expect(order).toEqual([expired, completed])
  })

  it('sends duplicates with the same id, and resends with a wrong secret, stale timestamp or tampered body', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const eventId = (await control('POST', `/_fake/sessions/${session.id}/complete?wait=true`)).json.event.id as string
    const { json } = await control('POST', `/_fake/events/${eventId}/duplicate`, { times: 3 })
    expect(json.attempts).toHaveLength(3)
    const copies = received.filter(item => item.event.id === eventId)
    expect(copies).toHaveLength(4)
    expect(new Set(copies.map(item => item.body)).size).toBe(1)

    const verify = (item: Received | undefined) => () => stripe.webhooks.constructEvent(item!.body, item!.signature, SECRET)
    for (const options of [{ secret: 'whsec_other' }, { timestamp: Math.floor(Date.now() / 1000) - 600 }, { tamper: true }]) {
      const before = received.length
      await control('POST', `/_fake/events/${eventId}/resend`, options)
      expect(verify(received[before])).toThrow(Stripe.errors.StripeSignatureVerificationError)
    }
    const before = received.length
    await control('POST', `/_fake/events/${eventId}/resend`, {})
    expect(verify(received[before])().id).toBe(eventId)
  })
  it('forges an event for an object (an expired after a completed, for the same session)', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const completed = (await control('POST', `/_fake/sessions/${session.id}/complete?wait=true`)).json.event.id as string
    const { status, json } = await control('POST', '/_fake/events', { type: 'checkout.session.expired', objectId: session.id, patch: { status: 'expired' } })
    expect(status).toBe(200)
    const late = await waitFor(() => received.find(item => item.event.id === json.id))
    expect(late.event.type).toBe('checkout.session.expired')
    expect(late.event.data.object).toMatchObject({ id: session.id, status: 'expired', payment_status: 'paid' })
    expect(received.findIndex(item => item.event.id === completed)).toBeLessThan(received.indexOf(late))
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('complete')
  })
})

describe('hosted checkout page', () => {
  it('shows the order and three buttons, and Pay redirects to the success URL', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const page = await fetch(session.url!)
    expect(page.status).toBe(200)
    const html = await page.text()
    expect(html).toContain('Local test checkout — no real money moves')
    expect(html).toContain('Brown wax blank, 2-minute')
    expect(html).toContain('The Lantern Waltz (4-minute)')
    expect(html).toContain('£61.00')
    expect(html).not.toMatch(/<script|https?:\/\/(?!127\.0\.0\.1)/)
    for (const [action, label] of [['pay', 'Pay'], ['decline', 'Decline card'], ['cancel', 'Cancel']]) {
      expect(html).toContain(`action="/pay/${session.id}/${action}"`)
      expect(html).toMatch(new RegExp(`<button[^>]*>${label}</button>`))
    }

    const paid = await fetch(`${session.url}/pay`, { method: 'POST', redirect: 'manual' })
    expect(paid.status).toBe(303)
    expect(paid.headers.get('location')).toBe(`http://127.0.0.1:3999/checkout/success?session_id=${session.id}`)
    expect((await stripe.checkout.sessions.retrieve(session.id)).payment_status).toBe('paid')
    const after = await (await fetch(`${fake.url}/pay/${session.id}`)).text()
    expect(after).toContain('complete')
    expect(after).not.toContain('<button')
  })

  it('Decline card fails the payment intent and keeps the session open; Cancel goes to cancel_url', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const declined = await fetch(`${fake.url}/pay/${session.id}/decline`, { method: 'POST', redirect: 'manual' })
    expect(declined.status).toBe(303)
    const page = await (await fetch(new URL(declined.headers.get('location')!, fake.url))).text()
    expect(page).toContain('Your card was declined')
    expect(page).toContain(`href="/pay/${session.id}"`)

    const failed = await waitFor(() => received.find(item => item.event.type === 'payment_intent.payment_failed' && (item.event.data.object as Stripe.PaymentIntent).metadata.checkout_session === session.id))
    const intent = failed.event.data.object as Stripe.PaymentIntent
    expect(intent).toMatchObject({ status: 'requires_payment_method', metadata: { order: 'GW-1001' }, last_payment_error: { code: 'card_declined' } })
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('open')

    const cancelled = await fetch(`${fake.url}/pay/${session.id}/cancel`, { method: 'POST', redirect: 'manual' })
    expect(cancelled.status).toBe(303)
    expect(cancelled.headers.get('location')).toBe('http://127.0.0.1:3999/cart')
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('open')
  })
})

describe('errors in the real shape', () => {
  it('answers 401 without a valid key', async () => {
    const response = await fetch(`${fake.url}/v1/checkout/sessions`)
    expect(response.status).toBe(401)
    const body = await response.json() as any
    expect(body.error.type).toBe('invalid_request_error')
    expect(body.error.message).toMatch(/did not provide an API key/)
    const wrong = new Stripe('sk_live_nope', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 })
    await expect(wrong.checkout.sessions.list()).rejects.toBeInstanceOf(Stripe.errors.StripeAuthenticationError)
  })

  it('answers 400 with the missing or bad param named, and 404 for unknown ids', async () => {
    const cases: [Partial<Stripe.Checkout.SessionCreateParams>, string][] = [
      [{ line_items: undefined }, 'line_items'],
      [{ success_url: undefined }, 'success_url'],
      [{ line_items: [{ price_data: { currency: 'gbp', unit_amount: 100, product_data: { name: 'x' } } }] }, 'line_items[0][quantity]'],
      [{ expires_at: Math.floor(Date.now() / 1000) + 60 }, 'expires_at'],
    ]
    for (const [overrides, param] of cases) {
      const error = await stripe.checkout.sessions.create(sessionParams(overrides)).catch(caught => caught)
      expect(error).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
      expect(error.statusCode).toBe(400)
      expect(error.param).toBe(param)
    }
    const raw = await fetch(`${fake.url}/v1/checkout/sessions`, { method: 'POST', headers: { 'authorization': 'Bearer sk_test_x', 'content-type': 'application/x-www-form-urlencoded' }, body: 'mode=payment' })
    expect(raw.status).toBe(400)
    expect((await raw.json() as any).error).toMatchObject({ type: 'invalid_request_error', param: 'line_items', code: 'parameter_missing' })

    const missing = await stripe.paymentIntents.retrieve('pi_nope').catch(caught => caught)
    expect(missing).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(missing.statusCode).toBe(404)
    expect(missing.code).toBe('resource_missing')
  })
})
