import Stripe from 'stripe'

let client: Stripe | undefined

// The defaults in nuxt.config.ts: published in this repository, so only fit for the local fake.
export const LOCAL_FAKE_SECRET_KEY = 'sk_test_local_fake_key'
export const LOCAL_FAKE_WEBHOOK_SECRET = 'whsec_local_fake'

/** How far a webhook signature's time may lie behind or ahead of ours, in seconds. */
export const WEBHOOK_TOLERANCE_S = 300

/**
 * The payment service through the official SDK. With the default settings it talks to the local fake
 * (`fakes/stripe`) over http on 127.0.0.1; with a real key and no host override, to the real service.
 */
export function useStripe(): Stripe {
  if (!client) {
    const config = useRuntimeConfig()
    const host = String(config.stripeApiHost || '')
    client = new Stripe(String(config.stripeSecretKey), {
      ...(host ? { host, port: Number(config.stripeApiPort), protocol: String(config.stripeApiProtocol) as 'http' | 'https' } : {}),
      maxNetworkRetries: 2,
      timeout: 15_000,
      appInfo: { name: 'groovewright' },
    })
  }
  return client
}

export function webhookSecret(): string {
  return String(useRuntimeConfig().stripeWebhookSecret)
}

interface PaymentSettings { stripeSecretKey?: unknown, stripeApiHost?: unknown, stripeWebhookSecret?: unknown }

/**
 * Whether these settings reach the real payment service: no host override (the SDK then goes to
 * Stripe itself), or a key of the real service's shape that is not the fake's published one (a real
 * key pointed at some other host is still a real account's key).
 */
export function usesRealPaymentService(settings: PaymentSettings): boolean {
  const key = String(settings.stripeSecretKey ?? '').trim()
  const host = String(settings.stripeApiHost ?? '').trim()
  return host === '' || (/^[sr]k_(live|test)_/.test(key) && key !== LOCAL_FAKE_SECRET_KEY)
}

/**
 * Why the server must not start with these payment settings, or null. Anyone can sign a webhook with
 * the published local secret, so with real money behind it a forged "paid" would be believed.
 */
export function paymentSettingsProblem(settings: PaymentSettings): string | null {
  if (!usesRealPaymentService(settings)) return null
  const secret = String(settings.stripeWebhookSecret ?? '').trim()
  if (secret === LOCAL_FAKE_WEBHOOK_SECRET || secret === '') {
    return `NUXT_STRIPE_WEBHOOK_SECRET must be set to the signing secret (whsec_…) of this shop's webhook endpoint in the Stripe dashboard: a real Stripe key is configured (NUXT_STRIPE_SECRET_KEY / NUXT_STRIPE_API_HOST), and the webhook secret is ${secret ? `still the published local default "${LOCAL_FAKE_WEBHOOK_SECRET}"` : 'empty'}, with which anyone could sign a payment event.`
  }
  return null
}

/** The configured payment settings, checked (the server refuses to start otherwise: see plugins/checkSettings.ts). */
export function checkPaymentSettings(): void {
  const problem = paymentSettingsProblem(useRuntimeConfig())
  if (problem) throw new Error(problem)
}

/**
 * Why a signature header's time is unacceptable beyond what the SDK checks, or null. The SDK refuses
 * only signatures older than the tolerance; one from the future would otherwise stay valid until then,
 * so a captured or pre-made event could be replayed for as long as its maker liked.
 */
export function signatureTimeProblem(header: string, nowMs = Date.now()): string | null {
  // Read like the SDK reads it (the last `t=` wins), so both judge the same timestamp.
  let timestamp = Number.NaN
  for (const part of header.split(',')) {
    const [key, value] = part.split('=')
    if (key === 't') timestamp = Number.parseInt(value ?? '', 10)
  }
  if (!Number.isFinite(timestamp)) return 'No timestamp in the signature header'
  if (timestamp - Math.floor(nowMs / 1000) > WEBHOOK_TOLERANCE_S) return 'Timestamp is in the future, outside the tolerance zone'
  return null
}

/** A webhook's event, once its signature and its time (at most 5 minutes either way) check out; throws otherwise. */
export function verifiedPaymentEvent(raw: string | Buffer, header: string): Stripe.Event {
  const paymentEvent = useStripe().webhooks.constructEvent(raw, header, webhookSecret(), WEBHOOK_TOLERANCE_S)
  const problem = signatureTimeProblem(header)
  if (problem) throw new Error(problem)
  return paymentEvent
}
