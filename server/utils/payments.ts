import Stripe from 'stripe'

let client: Stripe | undefined

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
