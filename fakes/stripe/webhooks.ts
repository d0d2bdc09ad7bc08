// Webhook delivery for the Stripe stand-in: signs each event like the real service
// (`Stripe-Signature: t=<unix>,v1=<hex HMAC-SHA256 of "t.payload">`), posts it to one endpoint, retries a
// non-2xx answer or a connection error with doubling back-off, and logs every attempt.
import { createHmac } from 'node:crypto'
import type { StripeEvent } from './state'
import { unixNow } from './util'

export function signPayload(payload: string, secret: string, timestamp = unixNow()) {
  const signature = createHmac('sha256', secret).update(`${timestamp}.${payload}`, 'utf8').digest('hex')
  return `t=${timestamp},v1=${signature}`
}

export type DeliveryState = 'held' | 'pending' | 'delivered' | 'failed' | 'no_endpoint'
export type DeliveryKind = 'automatic' | 'retry' | 'resend' | 'duplicate' | 'deliver'

export interface DeliveryAttempt {
  id: number
  eventId: string
  type: string
  kind: DeliveryKind
  attempt: number
  url: string
  status: number | null
  ok: boolean
  error: string | null
  at: string
  durationMs: number
  signature: 'valid' | 'wrong_secret' | 'old_timestamp' | 'tampered'
}

export interface EventRecord {
  event: StripeEvent
  /** The exact JSON sent every time (same bytes on each attempt and resend). */
  payload: string
  state: DeliveryState
  attempts: number
  lastStatus: number | null
}

export interface SendOptions {
  kind?: DeliveryKind
  /** Retry with back-off after a failed first attempt (default true). */
  retry?: boolean
  /** Sign with this secret instead (to test a wrong secret). */
  secret?: string
  /** Sign with this unix timestamp instead of now (to test a stale signature). */
  timestamp?: number
  /** Change the body after signing (to test a tampered payload). */
  tamper?: boolean
}

export interface DeliveryOptions {
  url: () => string | null
  secret: () => string
  attempts: number
  baseMs: number
  timeoutMs: number
  log: (line: string) => void
}

export function createDelivery(options: DeliveryOptions) {
  const records = new Map<string, EventRecord>()
  const log: DeliveryAttempt[] = []
  const timers = new Set<NodeJS.Timeout>()
  let generation = 0
  let nextAttemptId = 1

  function track(event: StripeEvent, hold: boolean) {
    const url = options.url()
    event.pending_webhooks = url ? 1 : 0
    const record: EventRecord = {
      event,
      payload: JSON.stringify(event, null, 2),
      state: url ? (hold ? 'held' : 'pending') : 'no_endpoint',
      attempts: 0,
      lastStatus: null,
    }
    records.set(event.id, record)
    if (url && !hold) void send(record, { kind: 'automatic' })
    return record
  }

  async function attemptOnce(record: EventRecord, attempt: number, send: SendOptions): Promise<DeliveryAttempt> {
    const url = options.url()
    const started = Date.now()
    const entry: DeliveryAttempt = {
      id: nextAttemptId++,
      eventId: record.event.id,
      type: record.event.type,
      kind: send.kind ?? 'automatic',
      attempt,
      url: url ?? '',
      status: null,
      ok: false,
      error: null,
      at: new Date(started).toISOString(),
      durationMs: 0,
      signature: send.tamper ? 'tampered' : send.secret !== undefined ? 'wrong_secret' : send.timestamp !== undefined ? 'old_timestamp' : 'valid',
    }
    if (!url) {
      entry.error = 'no webhook URL configured'
    }
    else {
      const header = signPayload(record.payload, send.secret ?? options.secret(), send.timestamp ?? unixNow())
      const body = send.tamper ? tamperWith(record.payload) : record.payload
      try {
        const response = await fetch(url, {
          method: 'POST',
          headers: {
            'content-type': 'application/json; charset=utf-8',
            'user-agent': 'Stripe/1.0 (local payment stand-in)',
            'accept': '*/*; q=0.5, application/xml',
            'cache-control': 'no-cache',
            'stripe-signature': header,
          },
          body,
          signal: AbortSignal.timeout(options.timeoutMs),
        })
        await response.arrayBuffer().catch(() => undefined)
        entry.status = response.status
        entry.ok = response.status >= 200 && response.status < 300
      }
      catch (error) {
        const cause = (error as { cause?: { code?: string, message?: string } }).cause
        entry.error = cause?.code ?? cause?.message ?? (error as Error).message
      }
    }
    entry.durationMs = Date.now() - started
    log.push(entry)
    record.attempts++
    record.lastStatus = entry.status
    options.log(`${entry.eventId} ${entry.type} → ${entry.status ?? entry.error} (attempt ${attempt}${entry.kind === 'automatic' || entry.kind === 'retry' ? '' : `, ${entry.kind}`}${entry.signature === 'valid' ? '' : `, ${entry.signature}`})`)
    return entry
  }

  /**
   * Sends one copy of the event; resolves with the first attempt's outcome. Later attempts (when it
   * failed and `retry` is on) run in the background: `baseMs`, then doubling, up to `attempts` in all.
   */
  async function send(record: EventRecord, sendOptions: SendOptions = {}) {
    const myGeneration = generation
    if (record.state === 'held' || record.state === 'no_endpoint') record.state = 'pending'
    const first = await attemptOnce(record, 1, sendOptions)
    settle(record, first)
    const retry = sendOptions.retry ?? true
    if (!first.ok && retry && options.attempts > 1) {
      const again = (attempt: number) => {
        const timer = setTimeout(async () => {
          timers.delete(timer)
          if (myGeneration !== generation) return
          const result = await attemptOnce(record, attempt, { ...sendOptions, kind: 'retry' })
          if (myGeneration !== generation) return
          settle(record, result)
          if (!result.ok && attempt < options.attempts) again(attempt + 1)
          else if (!result.ok && record.state !== 'delivered') record.state = 'failed'
        }, options.baseMs * 2 ** (attempt - 2))
        timers.add(timer)
      }
      again(2)
    }
    else if (!first.ok && record.state !== 'delivered') {
      record.state = 'failed'
    }
    return first
  }

  function settle(record: EventRecord, attempt: DeliveryAttempt) {
    if (attempt.ok) {
      record.state = 'delivered'
      record.event.pending_webhooks = 0
    }
  }

  function reset() {
    generation++
    for (const timer of timers) clearTimeout(timer)
    timers.clear()
    records.clear()
    log.length = 0
  }

  return { records, log, track, send, reset, stop: reset }
}

function tamperWith(payload: string) {
  const event = JSON.parse(payload) as StripeEvent
  const object = event.data.object as { metadata?: Record<string, string> }
  object.metadata = { ...object.metadata, tampered: 'true' }
  return JSON.stringify(event, null, 2)
}
