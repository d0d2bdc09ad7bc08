import { describe, expect, it } from 'vitest'
import { paymentSettingsProblem, signatureTimeProblem, usesRealPaymentService } from '../../server/utils/shop/payments'

// The defaults in nuxt.config.ts: the local fake on 127.0.0.1 with the published key and secret.
const local = { stripeSecretKey: 'sk_test_local_fake_key', stripeApiHost: '127.0.0.1', stripeWebhookSecret: 'whsec_local_fake' }

describe('payment settings checked at start', () => {
  it('the local fake with its published defaults starts', () => {
    expect(usesRealPaymentService(local)).toBe(false)
    expect(paymentSettingsProblem(local)).toBeNull()
    // Any other fake-looking key on the local host is still the fake.
    expect(paymentSettingsProblem({ ...local, stripeSecretKey: 'fake' })).toBeNull()
  })

  it('a real key, or no host override (the real service), with the published or an empty webhook secret refuses, naming the variable', () => {
    const real = [
      { ...local, stripeSecretKey: 'sk_live_51AbCdEf' },
      { ...local, stripeSecretKey: 'sk_test_51AbCdEf' },
      { ...local, stripeSecretKey: 'rk_live_51AbCdEf' },
      { ...local, stripeApiHost: '' },
      { ...local, stripeApiHost: undefined },
      { ...local, stripeSecretKey: 'sk_live_51AbCdEf', stripeApiHost: '' },
    ]
    for (const settings of real) {
      expect(usesRealPaymentService(settings), JSON.stringify(settings)).toBe(true)
      expect(paymentSettingsProblem(settings), JSON.stringify(settings)).toMatch(/NUXT_STRIPE_WEBHOOK_SECRET/)
      expect(paymentSettingsProblem(settings)).toMatch(/published local default "whsec_local_fake"/)
      expect(paymentSettingsProblem({ ...settings, stripeWebhookSecret: '' })).toMatch(/NUXT_STRIPE_WEBHOOK_SECRET[\s\S]*empty/)
      expect(paymentSettingsProblem({ ...settings, stripeWebhookSecret: ' whsec_local_fake ' })).toMatch(/NUXT_STRIPE_WEBHOOK_SECRET/)
    }
  })

  it('a real key with its own webhook secret starts', () => {
    expect(paymentSettingsProblem({ stripeSecretKey: 'sk_live_51AbCdEf', stripeApiHost: '', stripeWebhookSecret: 'whsec_8a7b6c5d4e3f' })).toBeNull()
    expect(paymentSettingsProblem({ ...local, stripeSecretKey: 'sk_test_51AbCdEf', stripeWebhookSecret: 'whsec_8a7b6c5d4e3f' })).toBeNull()
  })
})

describe('webhook signature time', () => {
  const now = Date.UTC(2030, 0, 1, 12, 0, 0)
  const at = (offsetS: number) => `t=${Math.floor(now / 1000) + offsetS},v1=abc`

  it('accepts up to 5 minutes ahead (clocks differ a little); refuses more, and a year ahead', () => {
    expect(signatureTimeProblem(at(0), now)).toBeNull()
    expect(signatureTimeProblem(at(-299), now)).toBeNull()
    expect(signatureTimeProblem(at(300), now)).toBeNull()
    expect(signatureTimeProblem(at(301), now)).toMatch(/future/)
    expect(signatureTimeProblem(at(365 * 24 * 3600), now)).toMatch(/future/)
  })

  it('reads the timestamp as the SDK does (the last t= wins) and refuses a header without one', () => {
    expect(signatureTimeProblem(`${at(0)},${at(3600)}`, now)).toMatch(/future/)
    expect(signatureTimeProblem(`${at(3600)},${at(0)}`, now)).toBeNull()
    expect(signatureTimeProblem('v1=abc', now)).toMatch(/No timestamp/)
    expect(signatureTimeProblem('t=soon,v1=abc', now)).toMatch(/No timestamp/)
  })
})
