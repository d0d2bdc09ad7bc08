import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'
import { fillPattern, routeTable } from './routeTable'

await useTestServer()

// The workshop's routes from the route table (read from the files, so a new route is checked the day it is added):
// `blanks/[code]/reaming.post.ts` → POST /api/workshop/blanks/1/reaming.
function workshopRoutes() {
  return routeTable('api', '/api')
    .filter(route => route.pattern.startsWith('/api/workshop/'))
    .map(route => ({ ...route, path: fillPattern(route.pattern, () => '1') }))
}

const routes = workshopRoutes()
const account = (role: string) => demoAccounts.find(a => a.role === role)!
const clients: Record<string, Client> = {}

beforeAll(async () => {
  clients.maker = await signedIn(account('maker').email, account('maker').password)
  clients.collector = await signedIn(account('collector').email, account('collector').password)
  clients.shipper = await signedIn(account('shipper').email, account('shipper').password)
})

// Non-GET requests carry this site's Origin (the Client sends it), so a 403 is the role check, not CSRF.
const call = (client: Client, route: { method: string, path: string }) => client.request(route.path, { method: route.method, body: route.method === 'GET' ? undefined : {} })

describe('every workshop route is the maker\'s alone', () => {
  it('finds the routes', () => {
    expect(routes.length).toBeGreaterThan(30)
    expect(routes).toContainEqual(expect.objectContaining({ method: 'POST', path: '/api/workshop/tickets/1/assign' }))
    expect(routes).toContainEqual(expect.objectContaining({ method: 'GET', path: '/api/workshop/dashboard' }))
  })

  it.each(routes)('$method $path ($file): anonymous 401, collector 403, shipper 403', async (route) => {
    const anonymous = await call(new Client(), route)
    expect(anonymous.status, `anonymous ${route.method} ${route.path}`).toBe(401)
    const collector = await call(clients.collector!, route)
    expect(collector.status, `collector ${route.method} ${route.path}`).toBe(403)
    const shipper = await call(clients.shipper!, route)
    expect(shipper.status, `shipper ${route.method} ${route.path}`).toBe(403)
  })
})

// ——— ids past the database's integer range (issue 6) ———

/** One more than any PostgreSQL integer can hold (2,147,483,647): sent to the database, it used to be a 500. */
const hugeId = '3000000000'

describe('an id past the database\'s integer range is a 400 naming the field, never a 500', () => {
  // Every workshop route with an [id] segment, from the same file walk; [code] gets a well-formed blank code.
  const idRoutes = routes.filter(route => route.pattern.includes('[id]')).map(route => ({
    ...route,
    path: route.pattern.replace(/\[id\]/g, hugeId).replace(/\[code\]/g, 'GW-26-0001'),
  }))

  it('finds the id routes', () => {
    // A sentinel, so a change to the walk cannot leave the test below with nothing to check.
    expect(idRoutes.map(route => `${route.method} ${route.pattern}`)).toEqual(expect.arrayContaining([
      'GET /api/workshop/tickets/[id]', 'POST /api/workshop/tickets/[id]/assign', 'GET /api/workshop/tickets/[id]/blanks',
      'POST /api/workshop/tickets/[id]/cut', 'POST /api/workshop/tickets/[id]/stage', 'GET /api/workshop/recorders/[id]',
      'PATCH /api/workshop/recorders/[id]', 'GET /api/workshop/test-cuts/[id]', 'GET /api/workshop/products/[id]',
      'PATCH /api/workshop/products/[id]', 'GET /api/workshop/products/[id]/changes', 'PATCH /api/workshop/users/[id]',
      'PATCH /api/workshop/batches/[id]', 'PATCH /api/workshop/blanks/[code]/surface-tests/[id]',
    ]))
  })

  it.each(idRoutes)('maker $method $path: 400 naming id', async (route) => {
    const answer = await clients.maker!.request(route.path, { method: route.method, body: route.method === 'GET' ? undefined : {} })
    expect(answer.status, `${route.method} ${route.path}: ${JSON.stringify(answer.body)}`).toBe(400)
    expect(answer.body.data.fields).toHaveProperty('id')
  })

  it('the public certificate page answers 400 to anyone, and a smaller unknown id is still 404', async () => {
    for (const client of [new Client(), clients.collector!, clients.maker!]) {
      const answer = await client.get(`/api/certificates/${hugeId}`)
      expect(answer.status).toBe(400)
      expect(answer.body.data.fields).toHaveProperty('id')
    }
    expect((await new Client().get('/api/certificates/2147483647')).status).toBe(404)
    expect((await clients.maker!.get('/api/workshop/tickets/2147483647')).status).toBe(404)
  })

  it('ids in query strings and bodies are bounded the same way', async () => {
    const maker = clients.maker!
    const checks: [Promise<{ status: number, body: any }>, string][] = [
      [maker.get(`/api/workshop/test-cuts?recorderId=${hugeId}`), 'recorderId'],
      [maker.post('/api/workshop/blanks', { batchId: Number(hugeId), format: 'two_minute' }), 'batchId'],
      [maker.post('/api/workshop/tickets/1/cut', { recorderId: Number(hugeId) }), 'recorderId'],
      [maker.get(`/api/workshop/bench/heat-fit?temperature=95&batchId=${hugeId}`), 'batchId'],
    ]
    for (const [request, field] of checks) {
      const answer = await request
      expect(answer.status, JSON.stringify(answer.body)).toBe(400)
      expect(answer.body.data.fields).toHaveProperty(field)
    }
    // The test-cut upload's recorderId arrives as a multipart text field.
    const form = new FormData()
    form.append('recorderId', hugeId)
    form.append('file', new Blob([new Uint8Array(64)], { type: 'audio/wav' }), 'cut.wav')
    const target = url('/api/workshop/test-cuts')
    const response = await fetch(target, { method: 'POST', body: form, headers: { origin: new URL(target).origin, accept: 'application/json', cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    expect(response.status).toBe(400)
    expect((await response.json()).data.fields).toHaveProperty('recorderId')
  })
})
