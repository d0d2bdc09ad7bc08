// The public catalogue, product answers and pages are kept between requests (server/utils/shop/catalogueCache.ts,
// server/middleware/page-cache.ts) and go out compressed (server/plugins/compression.ts). What a customer
// sees must still be current on the very next request after the maker changes a product or a sale moves stock.
import { url } from '@nuxt/test-utils/e2e'
import { describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

await useTestServer()
const maker = demoAccounts.find(a => a.role === 'maker')!

/** A page as a visitor without a cookie gets it (the kept copy when there is one). */
async function page(path: string, encoding = 'identity') {
  const response = await fetch(url(path), { headers: { 'accept': 'text/html', 'accept-encoding': encoding } })
  return { status: response.status, html: await response.text(), headers: response.headers }
}

const address = { name: 'Wren Holloway', line1: '9 Quill Lane', city: 'Lowmere', postalCode: 'LM2 4AB', region: 'OR', country: 'US' }

describe('kept public answers are never stale', () => {
  it('a maker\'s price change shows in the catalogue API, the product API and the product page on the next request', async () => {
    const client = await signedIn(maker.email, maker.password)
    const slug = `fresh-cylinder-${Date.now()}`
    const made = await client.post('/api/workshop/products', { slug, title: `Freshness check ${slug}`, kind: 'blank', format: 'two_minute', material: 'hard stearic wax', priceMinor: 1500, stock: 1 })
    expect(made.status, JSON.stringify(made.body)).toBe(201)
    const listed = async () => (await new Client().get(`/api/shop/products?q=${slug}`)).body.items.map((item: { priceMinor: number }) => item.priceMinor)

    // Asked twice, so the second answer of each is the kept one.
    for (let i = 0; i < 2; i++) {
      expect(await listed()).toEqual([1500])
      expect((await new Client().get(`/api/shop/products/${slug}`)).body.priceMinor).toBe(1500)
      expect((await page(`/cylinders/${slug}`)).html).toContain('$15.00')
    }

    const patched = await client.request(`/api/workshop/products/${made.body.id}`, { method: 'PATCH', body: { priceMinor: 1875 } })
    expect(patched.status, JSON.stringify(patched.body)).toBe(200)
    expect(await listed()).toEqual([1875])
    expect((await new Client().get(`/api/shop/products/${slug}`)).body.priceMinor).toBe(1875)
    const after = await page(`/cylinders/${slug}`)
    expect(after.html).toContain('$18.75')
    expect(after.html).not.toContain('$15.00')

    // The last one is taken by a checkout: stock 0 at once, on the product page too, and a second buyer hears it is gone.
    const held = await new Client().post('/api/checkout', { items: [{ slug, qty: 1 }], email: `fresh-${Date.now()}@collectors.test`, shippingAddress: address, zone: 'domestic' })
    expect(held.status, JSON.stringify(held.body)).toBe(201)
    expect((await new Client().get(`/api/shop/products/${slug}`)).body.stock).toBe(0)
    expect((await page(`/cylinders/${slug}`)).html).toContain('Sold out')
    const late = await new Client().post('/api/checkout', { items: [{ slug, qty: 1 }], email: `late-${Date.now()}@collectors.test`, shippingAddress: address, zone: 'domestic' })
    expect(late.status).toBe(409)
  })

  it('a kept page goes out with a fresh CSP nonce each time, the same in its header and its scripts', async () => {
    const nonces = new Set<string>()
    for (let i = 0; i < 3; i++) {
      const { status, html, headers } = await page('/cylinders')
      expect(status).toBe(200)
      const headerNonce = /'nonce-([^']+)'/.exec(headers.get('content-security-policy') ?? '')?.[1]
      expect(headerNonce).toBeTruthy()
      const scriptNonces = [...html.matchAll(/<script[^>]*\snonce="([^"]+)"/g)].map(match => match[1])
      expect(scriptNonces.length).toBeGreaterThan(0)
      expect(new Set(scriptNonces)).toEqual(new Set([headerNonce]))
      nonces.add(headerNonce!)
    }
    expect(nonces.size).toBe(3)
  })

  it('pages and JSON go out compressed to clients that take it, plain to those that do not', async () => {
    const html = await fetch(url('/cylinders'), { headers: { 'accept-encoding': 'br' } })
    expect(html.headers.get('content-encoding')).toBe('br')
    expect(html.headers.get('vary')).toMatch(/accept-encoding/i)
    expect(await html.text()).toContain('</html>')
    const json = await fetch(url('/api/shop/products'), { headers: { 'accept-encoding': 'gzip' } })
    expect(json.headers.get('content-encoding')).toBe('gzip')
    expect((await json.json()).items.length).toBeGreaterThan(0)
    const plain = await page('/cylinders')
    expect(plain.headers.get('content-encoding')).toBeNull()
    expect(plain.html).toContain('</html>')
  })
})
