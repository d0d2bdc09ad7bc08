// Response headers (README "Security"): a CSP with a fresh nonce on pages, no framing, no sniffing, no
// X-Powered-By, no-store on the API, its CSV exports and pages with personal data; no HSTS, no CORS.
import { describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer, type Answer } from './harness'

await useTestServer()

const account = (role: string) => demoAccounts.find(a => a.role === role)!
const page = (client: Client, path: string) => client.request<string>(path, { headers: { accept: 'text/html' } })

/** The directives of a Content-Security-Policy header, by name. */
function directives(header: string | null): Map<string, string[]> {
  const map = new Map<string, string[]>()
  for (const part of (header ?? '').split(';')) {
    const [name, ...values] = part.trim().split(/\s+/)
    if (name) map.set(name.toLowerCase(), values)
  }
  return map
}

/** What every answer carries, page, API or file. */
function expectCommonHeaders(answer: Answer, what: string) {
  expect(answer.headers.get('x-content-type-options'), what).toBe('nosniff')
  expect(answer.headers.get('x-frame-options'), what).toBe('DENY')
  expect(answer.headers.get('referrer-policy'), what).toBe('same-origin')
  expect(answer.headers.has('x-powered-by'), what).toBe(false)
  expect(answer.headers.has('strict-transport-security'), what).toBe(false)
  expect(answer.headers.has('access-control-allow-origin'), what).toBe(false)
}

describe('security headers', () => {
  it('a page: a CSP whose nonce is new on every request and on every inline script, no framing', async () => {
    const visitor = new Client()
    const first = await page(visitor, '/cylinders')
    const second = await page(visitor, '/cylinders')
    expect(first.status).toBe(200)
    expectCommonHeaders(first, '/cylinders')
    const csp = directives(first.headers.get('content-security-policy'))
    expect(csp.get('frame-ancestors')).toEqual(['\'none\''])
    expect(csp.get('default-src')).toEqual(['\'self\''])
    expect(csp.get('object-src')).toEqual(['\'none\''])
    expect(csp.get('base-uri')).toEqual(['\'none\''])
    expect(csp.has('upgrade-insecure-requests')).toBe(false)
    const scriptSrc = csp.get('script-src') ?? []
    expect(scriptSrc).not.toContain('\'unsafe-inline\'')
    expect(scriptSrc).not.toContain('\'unsafe-eval\'')
    const nonce = /^'nonce-([A-Za-z0-9+/=]{16,})'$/.exec(scriptSrc.find(value => value.startsWith('\'nonce-')) ?? '')?.[1]
    expect(nonce).toBeDefined()
    const secondNonce = /'nonce-([^']+)'/.exec(second.headers.get('content-security-policy') ?? '')?.[1]
    expect(secondNonce).toBeDefined()
    expect(secondNonce).not.toBe(nonce)
    // Every script in the page carries this response's nonce, and no other.
    const scripts = first.body.match(/<script\b[^>]*>/g) ?? []
    expect(scripts.length).toBeGreaterThan(0)
    for (const tag of scripts) expect(tag, tag).toContain(`nonce="${nonce}"`)
    expect(first.body).not.toContain('{{nonce}}')
    // A public page may be kept by the browser like any page; no cache header is forced on it.
    expect(first.headers.get('cache-control') ?? '').not.toMatch(/public/)
  })

  it('a page with personal data is not stored by any cache', async () => {
    const collector = await signedIn(account('collector').email, account('collector').password)
    for (const path of ['/account', '/cart']) {
      const answer = await page(collector, path)
      expect(answer.status, path).toBe(200)
      expect(answer.headers.get('cache-control'), path).toBe('no-store')
      expectCommonHeaders(answer, path)
      expect(directives(answer.headers.get('content-security-policy')).get('frame-ancestors'), path).toEqual(['\'none\''])
    }
    const maker = await signedIn(account('maker').email, account('maker').password)
    for (const path of ['/workshop', '/workshop/orders', '/dispatch']) {
      const answer = await page(maker, path)
      expect(answer.status, path).toBe(200)
      expect(answer.headers.get('cache-control'), path).toBe('no-store')
    }
  })

  it('an API answer: no-store, no framing, nothing to run, no CORS for another site', async () => {
    const visitor = new Client()
    const answer = await visitor.request('/api/shop/products', { headers: { origin: 'https://elsewhere.example' } })
    expect(answer.status).toBe(200)
    expectCommonHeaders(answer, '/api/shop/products')
    expect(answer.headers.get('cache-control')).toBe('no-store')
    const csp = directives(answer.headers.get('content-security-policy'))
    expect(csp.get('default-src')).toEqual(['\'none\''])
    expect(csp.get('frame-ancestors')).toEqual(['\'none\''])
    // A preflight from another site is given no permission either.
    const preflight = await visitor.request('/api/cart/quote', {
      method: 'OPTIONS',
      origin: 'https://elsewhere.example',
      headers: { 'access-control-request-method': 'POST', 'access-control-request-headers': 'content-type' },
    })
    expect(preflight.headers.has('access-control-allow-origin')).toBe(false)
    expect(preflight.headers.has('access-control-allow-credentials')).toBe(false)
    // A signed-in answer with personal data.
    const collector = await signedIn(account('collector').email, account('collector').password)
    const me = await collector.get('/api/auth/me')
    expect(me.status).toBe(200)
    expect(me.headers.get('cache-control')).toBe('no-store')
    expect(me.headers.has('x-powered-by')).toBe(false)
  })

  it('the CSV exports for a signed-in maker: no-store, an attachment, no sniffing', async () => {
    const maker = await signedIn(account('maker').email, account('maker').password)
    for (const path of ['/api/workshop/exports/orders.csv', '/api/workshop/exports/blanks.csv']) {
      const answer = await maker.request<string>(path, { headers: { accept: 'text/csv' } })
      expect(answer.status, path).toBe(200)
      expect(answer.headers.get('content-type'), path).toMatch(/^text\/csv/)
      expect(answer.headers.get('content-disposition'), path).toMatch(/^attachment; filename="?[\w.-]+\.csv"?$/)
      expect(answer.headers.get('cache-control'), path).toBe('no-store')
      expectCommonHeaders(answer, path)
    }
    // And to anyone else, no export: the refusal is not stored either.
    const refused = await new Client().request('/api/workshop/exports/orders.csv')
    expect(refused.status).toBe(401)
    expect(refused.headers.get('cache-control')).toBe('no-store')
    expect(refused.headers.has('x-powered-by')).toBe(false)
  })

  it('a stored file keeps its own sandboxing CSP', async () => {
    const answer = await new Client().request('/files/demo1-tallow-yard-two-step-photo-1')
    expect(answer.status).toBe(200)
    expect(answer.headers.get('x-content-type-options')).toBe('nosniff')
    expect(answer.headers.has('x-powered-by')).toBe(false)
    const csp = directives(answer.headers.get('content-security-policy'))
    expect(csp.get('default-src')).toEqual(['\'none\''])
    expect(csp.has('sandbox')).toBe(true)
  })

  it('the module\'s own rate limiter, size limiter and XSS filter are off (the app has its own checks)', async () => {
    const visitor = new Client()
    // The module's rate limiter would answer 429 after 150 requests in its window.
    const statuses = new Set<number>()
    for (let batch = 0; batch < 8; batch++) {
      const answers = await Promise.all(Array.from({ length: 25 }, () => visitor.get('/api/health')))
      for (const answer of answers) statuses.add(answer.status)
    }
    expect([...statuses]).toEqual([200])
    // Its XSS filter would refuse a query holding markup with 400.
    const search = await visitor.get(`/api/shop/products?q=${encodeURIComponent('<b>wax</b>')}`)
    expect(search.status).toBe(200)
  })
})
