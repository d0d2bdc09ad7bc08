// A stand-in for the payment service: a stateful HTTP server on 127.0.0.1 speaking the subset of the
// Stripe API the shop uses (Checkout Sessions, Payment Intents, Charges, Refunds, Events), form-encoded
// like the real API, with its own hosted checkout page and signed webhooks. The app talks to it through
// the real SDK: `new Stripe('sk_test_…', { host: '127.0.0.1', port, protocol: 'http' })`.
// Test controls live under `/_fake/`. Run alone with `npm run fake:stripe`.
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http'
import { pathToFileURL } from 'node:url'
import escapeHtml from 'escape-html'
import qs from 'qs'
import { checkoutPage, declinedPage, messagePage, PAGE_TITLE, successUrlFor } from './page'
import { createState, NO_REQUEST, type Charge, type CheckoutSession, type RequestInfo, type StripeEvent } from './state'
import {
  ApiError, canonical, createdFilter, expandPaths, invalid, isObject, LIST_PARAMS, listPage, makeId,
  readArray, readExpand, readString, rejectUnknown, unrecognisedUrl, type Params,
} from './util'
import { createDelivery, type DeliveryAttempt, type SendOptions } from './webhooks'

export { signPayload } from './webhooks'
export type { CheckoutSession, PaymentIntent, Charge, Refund, StripeEvent } from './state'
export type { DeliveryAttempt } from './webhooks'

/** The API version the events carry: the one `stripe` 23.1.0 pins. */
export const FAKE_API_VERSION = '2026-10-28.endive'

export interface StripeFakeOptions {
  /** 0 picks a free port (read it back from the result). Default 12111. */
  port?: number
  /** Where events are POSTed; `null` or '' keeps them stored but unsent. */
  webhookUrl?: string | null
  webhookSecret?: string
  /** Base of the hosted page links in `session.url` (default `http://127.0.0.1:<port>`). */
  publicUrl?: string
  quiet?: boolean
  /** Webhook retries: `attempts` in all (default 8), first wait `baseMs` (default 500), doubling. */
  retry?: { attempts?: number, baseMs?: number }
  /** How often open sessions past `expires_at` are expired (default 1000 ms; 0 turns the sweep off). */
  expireSweepMs?: number
  /** Time allowed for the webhook endpoint to answer (default 10 s). */
  webhookTimeoutMs?: number
  /** Hold every new event until `/_fake/deliver` (default false). */
  holdEvents?: boolean
  apiVersion?: string
}

interface StoredResponse { fingerprint: string, endpoint: string, status: number, body: string, requestId: string, at: number }

const QS_OPTIONS = { depth: 10, arrayLimit: 1000, parameterLimit: 5000, allowDots: false } as const
const MAX_BODY = 1024 * 1024

class HttpError extends Error {
  constructor(readonly status: number, message: string) {
    super(message)
  }
}

export async function startStripeFake(options: StripeFakeOptions = {}) {
  const host = '127.0.0.1'
  let port = options.port ?? 12111
  let webhookUrl: string | null = options.webhookUrl === undefined ? null : options.webhookUrl || null
  let webhookSecret = options.webhookSecret ?? 'whsec_local_fake'
  let holdAll = options.holdEvents ?? false
  let holdNext = false
  const quiet = options.quiet ?? false
  const log = (line: string) => {
    if (!quiet) console.log(`[stripe] ${line}`)
  }
  const publicUrl = () => (options.publicUrl ?? `http://${host}:${port}`).replace(/\/$/, '')

  const delivery = createDelivery({
    url: () => webhookUrl,
    secret: () => webhookSecret,
    attempts: Math.max(1, options.retry?.attempts ?? 8),
    baseMs: options.retry?.baseMs ?? 500,
    timeoutMs: options.webhookTimeoutMs ?? 10_000,
    log,
  })
  const state = createState({
    apiVersion: options.apiVersion ?? FAKE_API_VERSION,
    publicUrl,
    onEvent: event => delivery.track(event, holdAll || holdNext),
  })
  const idempotency = new Map<string, StoredResponse>()

  /** Runs a state change whose events are held (not sent) when `hold` is true. */
  function holding<T>(hold: boolean, action: () => T): T {
    holdNext = hold
    try {
      return action()
    }
    finally {
      holdNext = false
    }
  }

  const expand = (object: unknown, params: Params) => {
    const paths = readExpand(params)
    return paths.length ? expandPaths(object, paths, state.resolve, state.computed) : object
  }

  // ---------------------------------------------------------------- the API (/v1)

  function route(method: string, path: string, params: Params, request: RequestInfo): unknown {
    const segments = path.split('/').slice(2).map(part => decodeURIComponent(part))
    const [resource, id, action, extra] = segments
    const get = method === 'GET'
    const post = method === 'POST'
    const retrieveOnly = () => rejectUnknown(params, ['expand'])

    if (resource === 'checkout' && id === 'sessions') {
      const sessionId = action
      const sub = extra
      if (segments.length === 2 && post) return expand(state.createSession(params), params)
      if (segments.length === 2 && get) {
        rejectUnknown(params, [...LIST_PARAMS, 'status', 'payment_intent', 'customer', 'customer_details', 'payment_link', 'subscription'])
        const status = readString(params.status, 'status')
        const intent = readString(params.payment_intent, 'payment_intent')
        const email = isObject(params.customer_details) ? readString(params.customer_details.email, 'customer_details[email]') : undefined
        const created = createdFilter(params.created)
        const items = state.newestFirst(state.sessions).filter(session => (!status || session.status === status)
          && (!intent || session.payment_intent === intent) && created(session.created)
          && (!email || session.customer_details?.email === email || session.customer_email === email))
        return expand(listPage(items, params, '/v1/checkout/sessions'), params)
      }
      if (segments.length === 3 && get && sessionId) {
        retrieveOnly()
        return expand(state.getSession(sessionId), params)
      }
      if (segments.length === 4 && get && sessionId && sub === 'line_items') {
        rejectUnknown(params, ['limit', 'starting_after', 'ending_before', 'expand'])
        state.getSession(sessionId)
        const items = state.lineItemsOf(sessionId).map(state.publicLineItem)
        return expand(listPage(items, params, `/v1/checkout/sessions/${sessionId}/line_items`), params)
      }
      if (segments.length === 4 && post && sessionId && sub === 'expire') {
        retrieveOnly()
        return expand(state.expireSession(sessionId, request, { api: true }).session, params)
      }
    }

    if (resource === 'payment_intents') {
      if (segments.length === 1 && get) {
        rejectUnknown(params, [...LIST_PARAMS, 'customer'])
        const created = createdFilter(params.created)
        return expand(listPage(state.newestFirst(state.paymentIntents).filter(pi => created(pi.created)), params, '/v1/payment_intents'), params)
      }
      if (segments.length === 2 && get && id) {
        rejectUnknown(params, ['expand', 'client_secret'])
        return expand(state.getPaymentIntent(id), params)
      }
    }

    if (resource === 'charges') {
      if (segments.length === 1 && get) {
        rejectUnknown(params, [...LIST_PARAMS, 'customer', 'payment_intent', 'transfer_group'])
        const intent = readString(params.payment_intent, 'payment_intent')
        const created = createdFilter(params.created)
        return expand(listPage(state.newestFirst(state.charges).filter(charge => (!intent || charge.payment_intent === intent) && created(charge.created)), params, '/v1/charges'), params)
      }
      if (segments.length === 2 && get && id) {
        retrieveOnly()
        return expand(state.getCharge(id), params)
      }
    }

    if (resource === 'refunds') {
      if (segments.length === 1 && post) return expand(state.createRefund(params, request).refund, params)
      if (segments.length === 1 && get) {
        rejectUnknown(params, [...LIST_PARAMS, 'charge', 'payment_intent'])
        const intent = readString(params.payment_intent, 'payment_intent')
        const charge = readString(params.charge, 'charge')
        const created = createdFilter(params.created)
        const items = state.newestFirst(state.refunds).filter(refund => (!intent || refund.payment_intent === intent)
          && (!charge || refund.charge === charge) && created(refund.created))
        return expand(listPage(items, params, '/v1/refunds'), params)
      }
      if (segments.length === 2 && get && id) {
        retrieveOnly()
        return expand(state.getRefund(id), params)
      }
    }

    if (resource === 'events') {
      if (segments.length === 1 && get) {
        rejectUnknown(params, [...LIST_PARAMS, 'type', 'types', 'delivery_success'])
        const type = readString(params.type, 'type')
        const types = (readArray(params.types, 'types') ?? []).map(item => String(item))
        const matches = (eventType: string) => {
          if (types.length) return types.includes(eventType)
          if (!type) return true
          if (type.endsWith('*')) return eventType.startsWith(type.slice(0, -1))
          return eventType === type
        }
        const created = createdFilter(params.created)
        const items = state.newestFirst(state.events).filter(event => matches(event.type) && created(event.created))
        return expand(listPage(items, params, '/v1/events'), params)
      }
      if (segments.length === 2 && get && id) {
        retrieveOnly()
        return expand(state.getEvent(id), params)
      }
    }

    throw unrecognisedUrl(method, path)
  }

  async function handleApi(req: IncomingMessage, res: ServerResponse, url: URL) {
    const requestId = makeId('req_', 14)
    const method = req.method ?? 'GET'
    const stripeVersion = headerOf(req, 'stripe-version')
    const send = (status: number, body: string, headers: Record<string, string> = {}) => {
      res.writeHead(status, {
        'content-type': 'application/json',
        'request-id': requestId,
        'stripe-version': stripeVersion ?? (options.apiVersion ?? FAKE_API_VERSION),
        'cache-control': 'no-cache, no-store',
        ...headers,
      })
      res.end(body)
    }
    const sendError = (error: ApiError, headers: Record<string, string> = {}) => send(error.status, JSON.stringify({ error: error.body }, null, 2), headers)

    const auth = checkAuth(req.headers.authorization)
    if (auth) return sendError(auth, { 'www-authenticate': 'Basic realm="Stripe"' })

    let params: Params
    try {
      const raw = method === 'POST' ? await readBody(req) : url.search.slice(1)
      params = qs.parse(raw, QS_OPTIONS) as Params
    }
    catch (error) {
      if (error instanceof HttpError) return sendError(new ApiError(error.status, { type: 'invalid_request_error', message: error.message }))
      throw error
    }

    const key = method === 'POST' ? headerOf(req, 'idempotency-key') : undefined
    const endpoint = `${method} ${url.pathname}`
    const fingerprint = canonical(params)
    if (key !== undefined) {
      if (key.length > 255) return sendError(invalid('Idempotency keys can be at most 255 characters long.', undefined, 'idempotency_key_in_use'))
      const stored = idempotency.get(key)
      if (stored) {
        if (stored.endpoint !== endpoint) {
          return sendError(new ApiError(400, { type: 'idempotency_error', message: `Keys for idempotent requests can only be used for the same endpoint they were first used for ('${stored.endpoint}' vs '${endpoint}'). Try using a key other than '${key}' if you meant to execute a different request.` }))
        }
        if (stored.fingerprint !== fingerprint) {
          return sendError(new ApiError(400, { type: 'idempotency_error', message: `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${key}' if you meant to execute a different request.` }))
        }
        return send(stored.status, stored.body, { 'idempotency-key': key, 'idempotent-replayed': 'true', 'original-request': stored.requestId })
      }
    }

    const request: RequestInfo = { id: requestId, idempotency_key: key ?? null }
    let status = 200
    let body: string
    let keep = true
    try {
      body = JSON.stringify(route(method, url.pathname, params, request), null, 2)
    }
    catch (error) {
      if (!(error instanceof ApiError)) throw error
      status = error.status
      keep = !error.validation
      body = JSON.stringify({ error: error.body }, null, 2)
    }
    if (key !== undefined && keep) {
      idempotency.set(key, { fingerprint, endpoint, status, body, requestId, at: Date.now() })
      // Keys are kept 24 hours, as by the real API (and at most 20 000 of them here).
      for (const [oldKey, stored] of idempotency) {
        if (idempotency.size <= 20_000 && stored.at > Date.now() - 24 * 3600_000) break
        idempotency.delete(oldKey)
      }
    }
    send(status, body, key !== undefined ? { 'idempotency-key': key } : {})
  }

  // ---------------------------------------------------------------- the hosted page (/pay)

  async function handlePage(req: IncomingMessage, res: ServerResponse, url: URL) {
    const html = (status: number, body: string, headers: Record<string, string> = {}) => {
      res.writeHead(status, {
        'content-type': 'text/html; charset=utf-8',
        'cache-control': 'no-store',
        'content-security-policy': 'default-src \'none\'; style-src \'unsafe-inline\'; img-src \'self\' data:; base-uri \'none\'; frame-ancestors \'none\'',
        'referrer-policy': 'no-referrer',
        'x-content-type-options': 'nosniff',
        ...headers,
      })
      res.end(body)
    }
    const redirect = (location: string) => {
      res.writeHead(303, { location, 'cache-control': 'no-store' })
      res.end()
    }
    const match = /^\/pay\/([^/]+)(?:\/(pay|decline|cancel))?$/.exec(url.pathname)
    const session = match ? state.sessions.get(decodeURIComponent(match[1]!)) : undefined
    if (!match || !session) return html(404, messagePage('No such checkout', 'This checkout link is not known here. It may have been made before the stand-in restarted.'))
    const items = state.lineItemsOf(session.id)
    const action = match[2]
    const method = req.method ?? 'GET'

    if (!action) {
      if (method !== 'GET' && method !== 'HEAD') return html(405, messagePage('Not allowed', 'Use the buttons on the checkout page.'), { allow: 'GET' })
      if (url.searchParams.get('declined') === '1' && session.status === 'open') return html(200, declinedPage(session, items))
      return html(200, checkoutPage(session, items))
    }
    if (method !== 'POST') return html(405, messagePage('Not allowed', 'Use the buttons on the checkout page.'), { allow: 'POST' })
    await readBody(req).catch(() => '')
    const back = `/pay/${encodeURIComponent(session.id)}`
    if (action === 'cancel') {
      log(`${session.id} cancelled on the page`)
      if (session.cancel_url) return redirect(session.cancel_url)
      return html(200, messagePage('Checkout cancelled', 'You left the checkout without paying.', { href: back, label: 'Back to the checkout' }))
    }
    if (session.status !== 'open') return redirect(back)
    if (action === 'pay') {
      const done = holding(false, () => state.completeSession(session.id))
      log(`${session.id} paid on the page (${done.paymentIntent.id})`)
      return redirect(successUrlFor(done.session))
    }
    const failed = holding(false, () => state.declineSession(session.id))
    log(`${session.id} declined on the page (${failed.paymentIntent.id})`)
    return redirect(`${back}?declined=1`)
  }

  // ---------------------------------------------------------------- test controls (/_fake)

  const eventSummary = (event: StripeEvent) => {
    const record = delivery.records.get(event.id)
    const object = event.data.object as { id?: string, metadata?: Record<string, string> }
    return {
      id: event.id,
      type: event.type,
      created: event.created,
      objectId: object?.id ?? null,
      delivery: record?.state ?? 'no_endpoint',
      attempts: record?.attempts ?? 0,
      lastStatus: record?.lastStatus ?? null,
      event,
    }
  }

  const recordOf = (id: string) => {
    const record = delivery.records.get(id)
    if (!record) throw new HttpError(404, `No such event: '${id}'`)
    return record
  }

  const attemptSummary = (attempt: DeliveryAttempt) => ({ eventId: attempt.eventId, type: attempt.type, attempt: attempt.attempt, status: attempt.status, ok: attempt.ok, error: attempt.error })

  async function handleFake(req: IncomingMessage, res: ServerResponse, url: URL) {
    const json = (status: number, body: unknown) => {
      res.writeHead(status, { 'content-type': 'application/json', 'cache-control': 'no-store' })
      res.end(JSON.stringify(body, null, 2))
    }
    const method = req.method ?? 'GET'
    const body = method === 'POST' ? await readJson(req) : {}
    const path = url.pathname
    const flag = (name: string, fallback: boolean) => {
      const value = url.searchParams.get(name) ?? (isObject(body) && body[name] !== undefined ? String(body[name]) : undefined)
      return value === undefined ? fallback : value !== 'false' && value !== '0'
    }

    try {
      const sessionAction = /^\/_fake\/sessions\/([^/]+)\/(complete|decline|expire)$/.exec(path)
      if (sessionAction && method === 'POST') {
        const id = decodeURIComponent(sessionAction[1]!)
        const deliver = flag('deliver', true)
        const wait = flag('wait', false)
        const result = holding(!deliver, () => sessionAction[2] === 'complete'
          ? state.completeSession(id)
          : sessionAction[2] === 'decline' ? state.declineSession(id) : { ...state.expireSession(id), paymentIntent: null, charge: null })
        let first: DeliveryAttempt | null = null
        if (wait && deliver) first = await waitForFirstAttempt(result.event.id)
        return json(200, {
          session: result.session,
          payment_intent: result.paymentIntent,
          charge: result.charge,
          event: { id: result.event.id, type: result.event.type, delivery: delivery.records.get(result.event.id)?.state ?? 'no_endpoint' },
          ...(first ? { attempt: attemptSummary(first) } : {}),
        })
      }

      const eventAction = /^\/_fake\/events\/([^/]+)\/(resend|duplicate)$/.exec(path)
      if (eventAction && method === 'POST') {
        const record = recordOf(decodeURIComponent(eventAction[1]!))
        requireEndpoint()
        const options = isObject(body) ? body : {}
        if (eventAction[2] === 'resend') {
          const special = options.secret !== undefined || options.timestamp !== undefined || options.tamper === true
          const send: SendOptions = {
            kind: 'resend',
            retry: options.retry === undefined ? !special : options.retry === true,
            ...(typeof options.secret === 'string' ? { secret: options.secret } : {}),
            ...(typeof options.timestamp === 'number' ? { timestamp: options.timestamp } : {}),
            ...(options.tamper === true ? { tamper: true } : {}),
          }
          const attempt = await delivery.send(record, send)
          return json(200, { attempts: [attemptSummary(attempt)] })
        }
        const times = typeof options.times === 'number' ? options.times : 1
        if (!Number.isInteger(times) || times < 1 || times > 100) throw new HttpError(400, '`times` must be an integer from 1 to 100')
        const attempts = await Promise.all(Array.from({ length: times }, () => delivery.send(record, { kind: 'duplicate' })))
        return json(200, { attempts: attempts.map(attemptSummary) })
      }

      if (path === '/_fake/deliver' && method === 'POST') {
        const ids = isObject(body) && Array.isArray(body.eventIds) ? body.eventIds : undefined
        if (!ids || !ids.every(id => typeof id === 'string')) throw new HttpError(400, 'Send { "eventIds": ["evt_…", …] }')
        const records = (ids as string[]).map(recordOf)
        requireEndpoint()
        const attempts: DeliveryAttempt[] = []
        for (const record of records) attempts.push(await delivery.send(record, { kind: 'deliver' }))
        return json(200, { attempts: attempts.map(attemptSummary) })
      }

      if (path === '/_fake/events' && method === 'POST') {
        const options = isObject(body) ? body : {}
        const type = typeof options.type === 'string' ? options.type : undefined
        const objectId = typeof options.objectId === 'string' ? options.objectId : undefined
        if (!type || !objectId) throw new HttpError(400, 'Send { "type": "checkout.session.expired", "objectId": "cs_test_…", "patch": { … }, "deliver": true }')
        const found = state.resolve(objectId)
        if (!found) throw new HttpError(404, `No such object: '${objectId}'`)
        const object = found && (found as { object?: string }).object === 'charge' ? state.chargeWithRefunds(found as Charge) : structuredClone(found)
        if (isObject(options.patch)) Object.assign(object as object, options.patch)
        const event = holding(options.deliver === false, () => state.emit(type, object, NO_REQUEST))
        return json(200, eventSummary(event))
      }

      if (path === '/_fake/events' && method === 'GET') {
        const type = url.searchParams.get('type')
        const object = url.searchParams.get('object') ?? url.searchParams.get('session')
        const items = [...state.events.values()].filter(event => (!type || event.type === type)
          && (!object || JSON.stringify(event.data.object).includes(`"${object}"`)))
        return json(200, { data: items.map(eventSummary) })
      }
      if (path === '/_fake/deliveries' && method === 'GET') {
        const event = url.searchParams.get('event')
        return json(200, { data: delivery.log.filter(attempt => !event || attempt.eventId === event) })
      }
      if (path === '/_fake/sessions' && method === 'GET') return json(200, { data: [...state.sessions.values()] })
      if (path === '/_fake/reset' && method === 'POST') {
        reset()
        return json(200, { reset: true })
      }
      if (path === '/_fake/webhook' && method === 'GET') return json(200, { url: webhookUrl, secret: webhookSecret, hold: holdAll })
      if (path === '/_fake/webhook' && method === 'POST') {
        const options = isObject(body) ? body : {}
        if (options.url !== undefined) webhookUrl = typeof options.url === 'string' && options.url ? options.url : null
        if (typeof options.secret === 'string' && options.secret) webhookSecret = options.secret
        if (typeof options.hold === 'boolean') holdAll = options.hold
        return json(200, { url: webhookUrl, secret: webhookSecret, hold: holdAll })
      }
      if (path === '/_fake/refunds/pending-next' && method === 'POST') {
        state.holdNextRefund(flag('pending', true))
        return json(200, { pendingNext: flag('pending', true) })
      }
      const refundFail = /^\/_fake\/refunds\/([^/]+)\/fail$/.exec(path)
      if (refundFail && method === 'POST') {
        const { refund, event } = state.failRefund(decodeURIComponent(refundFail[1]!))
        return json(200, { refund, event })
      }
      if (path === '/_fake/hold' && method === 'POST') {
        holdAll = flag('hold', true)
        return json(200, { hold: holdAll })
      }
      throw new HttpError(404, `No such control: ${method} ${path}`)
    }
    catch (error) {
      if (error instanceof ApiError) return json(error.status, { error: error.body })
      if (error instanceof HttpError) return json(error.status, { error: { type: 'invalid_request_error', message: error.message } })
      throw error
    }
  }

  function requireEndpoint() {
    if (!webhookUrl) throw new HttpError(400, 'No webhook URL is set: POST /_fake/webhook { "url": … } first')
  }

  /** Waits (up to the webhook timeout and a little) for the first delivery attempt of an event. */
  async function waitForFirstAttempt(eventId: string) {
    const deadline = Date.now() + (options.webhookTimeoutMs ?? 10_000) + 1000
    while (Date.now() < deadline) {
      const attempt = delivery.log.find(entry => entry.eventId === eventId)
      if (attempt) return attempt
      if (delivery.records.get(eventId)?.state === 'no_endpoint') return null
      await new Promise(resolve => setTimeout(resolve, 5))
    }
    return null
  }

  function reset() {
    state.reset()
    delivery.reset()
    idempotency.clear()
    holdAll = options.holdEvents ?? false
  }

  function indexPage() {
    const rows = [...state.sessions.values()].reverse().slice(0, 50).map(session => `<tr><td><a href="/pay/${session.id}">${escapeHtml(session.id.slice(0, 24))}…</a></td><td>${session.status}</td><td>${session.payment_status}</td><td>${session.amount_total} ${session.currency}</td><td>${escapeHtml(JSON.stringify(session.metadata))}</td></tr>`).join('')
    const events = delivery.log.slice(-30).reverse().map(entry => `<tr><td>${entry.at}</td><td>${escapeHtml(entry.eventId)}</td><td>${escapeHtml(entry.type)}</td><td>${entry.attempt}</td><td>${entry.status ?? escapeHtml(entry.error ?? '')}</td></tr>`).join('')
    return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(PAGE_TITLE)}</title>
<style>body{font-family:system-ui,sans-serif;margin:2rem;max-width:70rem}table{border-collapse:collapse;width:100%;margin-bottom:2rem}td,th{border-bottom:1px solid #ddd;padding:.3rem;text-align:left;font-size:.9rem}</style></head>
<body><header><p><strong>${escapeHtml(PAGE_TITLE)}</strong></p></header><main><h1>Payment stand-in</h1>
<p>Webhooks go to <code>${escapeHtml(webhookUrl ?? '(nowhere)')}</code>.</p>
<h2>Checkout sessions</h2><table><thead><tr><th>Session</th><th>Status</th><th>Payment</th><th>Total</th><th>Metadata</th></tr></thead><tbody>${rows}</tbody></table>
<h2>Recent webhook attempts</h2><table><thead><tr><th>At</th><th>Event</th><th>Type</th><th>Attempt</th><th>Answer</th></tr></thead><tbody>${events}</tbody></table></main></body></html>`
  }

  // ---------------------------------------------------------------- the server

  const server = createServer((req, res) => {
    const url = new URL(req.url ?? '/', `http://${host}:${port}`)
    const path = url.pathname
    const work = path.startsWith('/v1/') || path === '/v1'
      ? handleApi(req, res, url)
      : path.startsWith('/_fake/')
        ? handleFake(req, res, url)
        : path.startsWith('/pay/')
          ? handlePage(req, res, url)
          : Promise.resolve().then(() => {
              if (path === '/' && req.method === 'GET') {
                res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' })
                res.end(indexPage())
              }
              else {
                res.writeHead(404, { 'content-type': 'text/plain' })
                res.end('Not found')
              }
            })
    work.catch((error: unknown) => {
      const status = error instanceof HttpError ? error.status : 500
      if (status === 500) console.error('[stripe] internal error', error)
      if (!res.headersSent) {
        res.writeHead(status, { 'content-type': 'application/json' })
        res.end(JSON.stringify({ error: { type: status === 500 ? 'api_error' : 'invalid_request_error', message: (error as Error).message } }))
      }
      else {
        res.end()
      }
    })
  })

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, host, () => {
      server.off('error', reject)
      resolve()
    })
  })
  const address = server.address()
  if (typeof address === 'object' && address) port = address.port

  const sweepMs = options.expireSweepMs ?? 1000
  const sweep = sweepMs > 0
    ? setInterval(() => {
        for (const id of state.sweepExpired()) log(`${id} expired (past expires_at)`)
      }, sweepMs)
    : undefined
  sweep?.unref()

  return {
    port,
    url: `http://${host}:${port}`,
    /** Every event so far, oldest first (copies). */
    events: () => structuredClone([...state.events.values()]),
    /** Every checkout session so far, oldest first (copies). */
    sessions: (): CheckoutSession[] => structuredClone([...state.sessions.values()]),
    /** Every webhook attempt so far, oldest first. */
    deliveries: () => structuredClone(delivery.log),
    setWebhookUrl(next: string | null) {
      webhookUrl = next || null
    },
    setWebhookSecret(next: string) {
      webhookSecret = next
    },
    reset,
    async close() {
      if (sweep) clearInterval(sweep)
      delivery.stop()
      await new Promise<void>((resolve) => {
        server.close(() => resolve())
        server.closeAllConnections()
      })
    },
  }
}

export type StripeFake = Awaited<ReturnType<typeof startStripeFake>>

function headerOf(req: IncomingMessage, name: string) {
  const value = req.headers[name]
  return Array.isArray(value) ? value[0] : value
}

/** Bearer `sk_test_…` (or `rk_test_…`), or Basic with the key as the user name, as the real API accepts. */
function checkAuth(header: string | undefined): ApiError | null {
  if (!header) {
    return new ApiError(401, {
      type: 'invalid_request_error',
      message: 'You did not provide an API key. You need to provide your API key in the Authorization header, using Bearer auth (e.g. \'Authorization: Bearer YOUR_SECRET_KEY\'). (This is the local payment stand-in: any sk_test_… key works.)',
    })
  }
  let key = ''
  const [scheme, value = ''] = header.split(/\s+/, 2)
  if (scheme?.toLowerCase() === 'bearer') key = value
  else if (scheme?.toLowerCase() === 'basic') key = Buffer.from(value, 'base64').toString('utf8').split(':')[0] ?? ''
  if (/^(sk|rk)_test_\w+$/.test(key)) return null
  if (!key) {
    return new ApiError(401, {
      type: 'invalid_request_error',
      message: 'You did not provide an API key. You need to provide your API key in the Authorization header, using Bearer auth (e.g. \'Authorization: Bearer YOUR_SECRET_KEY\'). (This is the local payment stand-in: any sk_test_… key works.)',
    })
  }
  const shown = key.length > 8 ? `${key.slice(0, 8)}${'*'.repeat(Math.max(0, key.length - 12))}${key.slice(-4)}` : key
  return new ApiError(401, {
    type: 'invalid_request_error',
    code: 'api_key_invalid',
    message: `Invalid API Key provided: ${shown}${key.startsWith('sk_live_') ? ' (this local stand-in accepts test keys only: sk_test_…)' : ''}`,
  })
}

function readBody(req: IncomingMessage) {
  return new Promise<string>((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    req.on('data', (chunk: Buffer) => {
      size += chunk.length
      if (size > MAX_BODY) {
        reject(new HttpError(413, 'Request body too large'))
        req.destroy()
        return
      }
      chunks.push(chunk)
    })
    req.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')))
    req.on('error', reject)
  })
}

async function readJson(req: IncomingMessage): Promise<unknown> {
  const text = await readBody(req)
  if (!text.trim()) return {}
  try {
    return JSON.parse(text)
  }
  catch {
    throw new HttpError(400, 'The body must be JSON')
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const webhook = process.env.STRIPE_FAKE_WEBHOOK_URL ?? 'http://127.0.0.1:3000/api/webhooks/stripe'
  const fake = await startStripeFake({
    port: Number(process.env.STRIPE_FAKE_PORT ?? 12111),
    webhookUrl: webhook || null,
    webhookSecret: process.env.STRIPE_FAKE_WEBHOOK_SECRET ?? 'whsec_local_fake',
    ...(process.env.STRIPE_FAKE_PUBLIC_URL ? { publicUrl: process.env.STRIPE_FAKE_PUBLIC_URL } : {}),
  })
  console.log(`[stripe] API on ${fake.url} (SDK: host 127.0.0.1, port ${fake.port}, protocol http); webhooks to ${webhook || '(nowhere)'}`)
  const stop = async () => {
    await fake.close()
    process.exit(0)
  }
  process.on('SIGINT', stop)
  process.on('SIGTERM', stop)
}
