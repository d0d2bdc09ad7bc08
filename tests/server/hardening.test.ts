import { get as httpGet } from 'node:http'
import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, freePort, signedIn, useTestServer } from './harness'
import type { Answer } from './harness'

// The shop's own address is http://localhost:<port>, while the tests reach it at 127.0.0.1: the other loopback name.
const port = await freePort()
const siteUrl = `http://localhost:${port}`
await useTestServer({ NUXT_SITE_URL: siteUrl }, { port })

/*
 * Inputs that once took the whole server down (an engine loop run ~1e308 times, heap exhausted) or
 * answered 500 (a NUL character handed to PostgreSQL). Each is now a 400 naming its field, and the
 * server still answers afterwards.
 */

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let reamedBlank: string

async function stillUp() {
  expect((await fetch(url('/api/health'))).status).toBe(200)
}

function refused(answer: Answer, field: string) {
  expect(answer.status, JSON.stringify(answer.body)).toBe(400)
  expect(Object.keys(answer.body.data?.fields ?? {}), JSON.stringify(answer.body)).toContain(field)
}

beforeAll(async () => {
  maker = await signedIn(account('maker').email, account('maker').password)
  const reamed = await maker.get('/api/workshop/blanks?state=reamed&pageSize=5')
  reamedBlank = reamed.body.blanks?.[0]?.code ?? reamed.body.items?.[0]?.code ?? reamed.body.rows?.[0]?.code
  expect(reamedBlank, JSON.stringify(reamed.body).slice(0, 300)).toMatch(/^GW-/)
})

describe('figures no bench could read are refused before any engine runs', () => {
  it('a reaming with an overhang of -1e308 (on any blank, known or not) is a 400 naming the field', async () => {
    for (const code of ['GW-26-9999', reamedBlank]) {
      refused(await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: -1e308, overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 72 }), 'overhangBeforeIn')
    }
    refused(await maker.post(`/api/workshop/blanks/${reamedBlank}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: 1e308, reamings: 4, roomTemperatureF: 72 }), 'overhangAfterIn')
    await stillUp()
  })

  it('a shaving from a diameter of 2147483648, 1e308, 2^53+1 or a 23-digit text is a 400 naming diameterBeforeIn', async () => {
    for (const diameterBeforeIn of [2147483648, 1e308, 2 ** 53 + 2, '99999999999999999999999']) {
      const answer = await maker.post(`/api/workshop/blanks/${reamedBlank}/shaving`, { diameterBeforeIn, lowDiameterIn: 2.19, diameterAfterIn: 2.19 })
      refused(answer, 'diameterBeforeIn')
      expect(answer.body.data.fields.diameterBeforeIn).toMatch(/at most 6 in/)
    }
    await stillUp()
  })

  it('a register diameter of 1e9 is refused, and an ordinary shaving afterwards works', async () => {
    refused(await maker.request(`/api/workshop/blanks/${reamedBlank}`, { method: 'PATCH', body: { diameterIn: 1e9 } }), 'diameterIn')
    const shaved = await maker.post(`/api/workshop/blanks/${reamedBlank}/shaving`, { diameterBeforeIn: '2.2', lowDiameterIn: '2.196', diameterAfterIn: '2.194' })
    expect(shaved.status, JSON.stringify(shaved.body)).toBe(201)
    expect(shaved.body.state).toBe('shaved')
  })

  it('the bench calculators take the same bounds, and a plan too long to list is an answer, not a loop', async () => {
    refused(await maker.get('/api/workshop/bench/reaming?overhang=-1e308'), 'overhang')
    refused(await maker.get('/api/workshop/bench/shaving?high=2147483648&low=2.19'), 'high')
    refused(await maker.get('/api/workshop/bench/heat-fit?temperature=95&bore=1e300'), 'bore')
    // -3.9 in read against a 7/16 in target at the finest travel allowed: about 555 reamings.
    const long = await maker.get('/api/workshop/bench/reaming?overhang=-3.9&perReaming=1/128')
    expect(long.status).toBe(200)
    expect(long.body.steps).toEqual([])
    expect(long.body.warnings[0]).toMatch(/More than 200 reamings/)
  })

  it('the engine settings form refuses figures past their bounds, naming each', async () => {
    const current = (await maker.get('/api/workshop/settings/engine')).body
    const settings = current.settings ?? current
    const answer = await maker.put('/api/workshop/settings/engine', {
      ...settings,
      reaming: { ...settings.reaming, perReamingIn: 1e-9 },
      shaving: { ...settings.shaving, minimumDiameterIn: 1e9 },
      prices: { ...settings.prices, blankMinor: { ...settings.prices.blankMinor, two_minute: 1e15 } },
    })
    expect(answer.status, JSON.stringify(answer.body)).toBe(400)
    expect(Object.keys(answer.body.data.fields)).toEqual(expect.arrayContaining(['reaming.perReamingIn', 'shaving.minimumDiameterIn', 'prices.blankMinor.two_minute']))
  })
})

describe('a control character in any text is a 400 naming the field, never a 500', () => {
  const nul = 'a\u0000b'

  it('in the JSON bodies of every area', async () => {
    const visitor = new Client()
    refused(await visitor.post('/api/auth/register', { name: nul, email: 'nul@example.com', password: 'long-enough-password-1' }), 'name')
    refused(await visitor.post('/api/cart/quote', { items: [{ slug: nul, qty: 1 }] }), 'items.0.slug')
    const address = { name: 'A', line1: 'B', city: 'C', postalCode: '1', country: 'D' }
    for (const field of Object.keys(address)) {
      refused(await visitor.post('/api/checkout', { items: [{ slug: 'x', qty: 1 }], email: 'a@example.com', zone: 'domestic', shippingAddress: { ...address, [field]: nul } }), `shippingAddress.${field}`)
    }
    refused(await maker.post('/api/workshop/batches', { code: 'WB-1', formula: 'stearic', pourDate: '2026-01-01', volumetricExpansionPerK: 0.0008, notes: nul }), 'notes')
    refused(await maker.request(`/api/workshop/blanks/${reamedBlank}`, { method: 'PATCH', body: { notes: nul } }), 'notes')
    refused(await maker.post(`/api/workshop/blanks/${reamedBlank}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 72, notes: nul }), 'notes')
    refused(await maker.post('/api/workshop/products', { title: nul }), 'title')
    refused(await maker.post('/api/workshop/recorders', { name: `\u001B${nul}` }), 'name')
    refused(await maker.put('/api/workshop/settings/shop', { name: nul }), 'name')
    // A field name can carry one too (stored JSON would refuse it).
    refused(await maker.put('/api/workshop/settings/shop', { [nul]: 1 }), 'body')
    await stillUp()
  })

  it('a body nested far deeper than any form is a 400, not a stack overflow', async () => {
    const depth = 100_000
    const answer = await new Client().request('/api/cart/quote', { method: 'POST', rawBody: `{"items":${'['.repeat(depth)}${']'.repeat(depth)}}` })
    expect(answer.status, JSON.stringify(answer.body).slice(0, 300)).toBe(400)
    expect(Object.keys(answer.body.data.fields)[0]).toMatch(/^items(\.0)+$/)
    await stillUp()
  })

  it('tab and line breaks are still welcome in notes', async () => {
    const answer = await maker.request(`/api/workshop/blanks/${reamedBlank}`, { method: 'PATCH', body: { notes: 'first line\n\tsecond line\r\n' } })
    expect(answer.status, JSON.stringify(answer.body)).toBe(200)
  })

  it('as %00 in an address or a query', async () => {
    const collector = await signedIn(account('collector').email, account('collector').password)
    const paths: [Client, string][] = [
      [collector, '/api/orders/%00'],
      [new Client(), '/api/shop/products/%00'],
      [maker, '/api/workshop/orders/%00'],
      [maker, '/api/workshop/blanks/GW%00'],
      [new Client(), '/files/%00'],
    ]
    for (const [client, path] of paths) refused(await client.get(path), 'path')
    refused(await maker.post('/api/workshop/orders/%00/cancel', {}), 'path')
    refused(await maker.post('/api/workshop/orders/%00/refund', {}), 'path')
    refused(await collector.post('/api/orders/%00/cancel', {}), 'path')
    for (const path of ['/api/shop/products?q=%00', '/api/workshop/orders?q=%00', '/api/workshop/blanks?q=%00', '/api/workshop/tickets?q=%00', '/api/workshop/exports/blanks.csv?q=%00', '/api/workshop/exports/orders.csv?q=%00', '/api/workshop/blanks?batch=%00', '/api/certificates?order=%00']) {
      const field = new URL(path, 'http://x').searchParams.keys().next().value!
      refused(await maker.get(path), field)
    }
    refused(await maker.get('/api/workshop/orders/%E0%A4%A'), 'path')
    await stillUp()
  })
})

describe('one address for the shop', () => {
  it('a page asked for under the other loopback name is sent to the shop\'s own address first, with no cookie set', async () => {
    expect(new URL(url('/')).hostname).toBe('127.0.0.1')
    const page = { accept: 'text/html' }
    const response = await fetch(url('/cylinders?format=two_minute'), { headers: page, redirect: 'manual' })
    expect(response.status).toBe(308)
    expect(response.headers.get('location')).toBe(`${siteUrl}/cylinders?format=two_minute`)
    expect(response.headers.getSetCookie()).toEqual([])
    // `//elsewhere` stays on the shop's own address.
    const sneaky = await fetch(url('//example.com/x'), { headers: page, redirect: 'manual' })
    expect(sneaky.headers.get('location')).toBe(`${siteUrl}//example.com/x`)
    // Under its own name the page is served; the API (and so the payment service's webhook) answers on either.
    expect(await statusFor('/cylinders', { ...page, host: `localhost:${port}` })).toBe(200)
    expect((await fetch(url('/api/health'), { headers: page })).status).toBe(200)
  })
})

describe('one setting for the shop\'s address', () => {
  it('pages take the public address from NUXT_SITE_URL alone (no NUXT_PUBLIC_SITE_URL is set)', async () => {
    const html = await bodyFor('/cylinders', { accept: 'text/html', host: `localhost:${port}` })
    // The default is http://localhost:3000; this server's address has another port. (The page's state is a
    // script whose strings write "/" as \u002F.)
    expect(html.replaceAll('\\u002F', '/')).toContain(`siteUrl:"${siteUrl}"`)
  })
})

describe('idle connections', () => {
  it('are kept 65 s, longer than clients and proxies keep theirs, so none sends on one the server has closed', async () => {
    await fetch(url('/api/health'))
    const header = await new Promise<string | undefined>((resolve, reject) => {
      httpGet(url('/api/health'), { headers: { connection: 'keep-alive' } }, (response) => {
        response.resume()
        resolve(response.headers['keep-alive'])
      }).on('error', reject)
    })
    expect(header).toBe('timeout=65')
  })
})

/** fetch() will not send a Host of our choosing; node:http will. */
function bodyFor(path: string, headers: Record<string, string>): Promise<string> {
  return new Promise((resolve, reject) => {
    httpGet(url(path), { headers }, (response) => {
      let text = ''
      response.setEncoding('utf8').on('data', (chunk: string) => (text += chunk)).on('end', () => resolve(text))
    }).on('error', reject)
  })
}

function statusFor(path: string, headers: Record<string, string>): Promise<number> {
  return new Promise((resolve, reject) => {
    httpGet(url(path), { headers }, (response) => {
      response.resume()
      resolve(response.statusCode ?? 0)
    }).on('error', reject)
  })
}
