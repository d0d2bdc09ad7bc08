import { describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

// The shipping zone and the sales tax follow from the shipping address, never from what the customer
// chooses. The figures below are the shop's default settings (shared/utils/engineSettings.ts): Domestic
// $12.00 a parcel, Rest of the world $45.00, home-state tax 8.25 % on goods and shipping in TX (a shop
// choice for the demo; country codes are ISO 3166-1 alpha-2).
await useTestServer()
const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let counter = 0

const home = { name: 'Wren Holloway', line1: '9 Quill Lane', city: 'Lowmere', postalCode: '75001', region: 'TX', country: 'US' }
const elsewhereInCountry = { ...home, region: 'OR', postalCode: '97001' }
const abroad = { name: 'Ilse Brandholm', line1: '4 Kettle Way', city: 'Nordwick', postalCode: '10115', country: 'DE' }

async function newProduct() {
  maker ??= await signedIn(account('maker').email, account('maker').password)
  const slug = `zone-cylinder-${Date.now()}-${++counter}`
  const answer = await maker.post('/api/workshop/products', { slug, title: `Zone cylinder ${counter}`, kind: 'blank', format: 'two_minute', material: 'hard stearic wax', priceMinor: 2000, stock: 10 })
  expect(answer.status, JSON.stringify(answer.body)).toBe(201)
  return answer.body as { slug: string }
}

async function placeOrder(slug: string, shippingAddress: Record<string, string>, extra: Record<string, unknown> = {}) {
  const created = await new Client().post('/api/checkout', { items: [{ slug, qty: 1 }], email: `zone-${Date.now()}-${++counter}@collectors.test`, shippingAddress, ...extra })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  return (await new Client().get(`/api/orders/${created.body.orderNumber}?t=${created.body.accessToken}`)).body
}

describe('zone and tax from the shipping address', () => {
  it('a foreign address cannot be charged the domestic rate or the home-state tax, even when the body asks for them', async () => {
    const { slug } = await newProduct()
    const order = await placeOrder(slug, abroad, { zone: 'domestic', taxRegion: 'home_state' })
    expect(order.zone).toBe('international')
    expect(order.shippingMinor).toBe(4500)
    expect(order.taxMinor).toBe(0)
    expect(order.shippingAddress.country).toBe('DE')
    expect(order.totalMinor).toBe(2000 + 4500)
  })

  it('a home-state address pays the home-state tax on goods and shipping; elsewhere in the country ships domestic without it', async () => {
    const { slug } = await newProduct()
    const taxed = await placeOrder(slug, home, { taxRegion: 'no_tax' })
    expect(taxed.zone).toBe('domestic')
    expect(taxed.shippingMinor).toBe(1200)
    // 8.25 % of $20.00 + $12.00 = $2.64 (to the cent).
    expect(taxed.taxMinor).toBe(264)
    const untaxed = await placeOrder(slug, elsewhereInCountry)
    expect(untaxed.zone).toBe('domestic')
    expect(untaxed.taxMinor).toBe(0)
    // Written out: the state's name and the country's name are the same place as their codes.
    const byName = await placeOrder(slug, { ...home, region: 'Texas', country: 'united states' })
    expect(byName.shippingAddress.country).toBe('US')
    expect(byName.taxMinor).toBe(264)
  })

  it('the cart quote shows what the server decided for the address; a made-up country is a 400 naming it', async () => {
    const { slug } = await newProduct()
    const client = new Client()
    const quote = await client.post('/api/cart/quote', { items: [{ slug, qty: 1 }], shipTo: { country: 'CA' }, zone: 'domestic' })
    expect(quote.status, JSON.stringify(quote.body)).toBe(200)
    expect(quote.body.place).toMatchObject({ country: 'CA', zone: 'north_america', taxRegion: 'no_tax' })
    expect(quote.body.shippingMinor).toBe(2800)
    const taxed = await client.post('/api/cart/quote', { items: [{ slug, qty: 1 }], shipTo: { country: 'US', region: 'tx' } })
    expect(taxed.body.place).toMatchObject({ zone: 'domestic', taxRegion: 'home_state', rateBasisPoints: 825 })
    const madeUp = await client.post('/api/cart/quote', { items: [{ slug, qty: 1 }], shipTo: { country: 'Utopia' } })
    expect(madeUp.status).toBe(400)
    expect(Object.keys(madeUp.body.data.fields)).toContain('shipTo.country')
    const refused = await client.post('/api/checkout', { items: [{ slug, qty: 1 }], email: 'a@b.test', shippingAddress: { ...abroad, country: 'Utopia' } })
    expect(refused.status).toBe(400)
    expect(Object.keys(refused.body.data.fields)).toContain('shippingAddress.country')
  })

  it('the shop figures refuse a country rule naming a zone the shop does not keep', async () => {
    maker ??= await signedIn(account('maker').email, account('maker').password)
    const current = (await maker.get('/api/workshop/settings/engine')).body.settings
    const refused = await maker.put('/api/workshop/settings/engine', { ...current, prices: { ...current.prices, countryZones: [{ country: 'FR', zone: 'the-moon' }] } })
    expect(refused.status).toBe(400)
    expect(Object.keys(refused.body.data.fields)).toContain('prices.countryZones.0.zone')
    expect((await maker.get('/api/workshop/settings/engine')).body.settings).toEqual(current)
  })
})
