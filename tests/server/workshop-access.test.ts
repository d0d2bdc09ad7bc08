import { readdirSync } from 'node:fs'
import { join, relative } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, rootDir, signedIn, useTestServer } from './harness'

await useTestServer()

/**
 * The route table, read from the files under server/api/workshop at test time, so a new route is
 * checked the day it is added: `blanks/[code]/reaming.post.ts` → POST /api/workshop/blanks/1/reaming.
 */
function workshopRoutes(): { method: string, path: string, file: string }[] {
  const base = join(rootDir, 'server/api/workshop')
  const files: string[] = []
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      if (entry.isDirectory()) walk(join(dir, entry.name))
      else if (entry.name.endsWith('.ts')) files.push(join(dir, entry.name))
    }
  }
  walk(base)
  return files.sort().map((file) => {
    const name = relative(base, file).replace(/\.ts$/, '')
    const match = /^(.*)\.(get|post|put|patch|delete)$/.exec(name)
    const [route, method] = match ? [match[1]!, match[2]!.toUpperCase()] : [name, 'GET']
    const segments = route.split('/')
      .filter((segment, index, all) => !(segment === 'index' && index === all.length - 1))
      .map(segment => segment.replace(/\[\.\.\.[^\]]+\]/g, 'x').replace(/\[[^\]]+\]/g, '1'))
    return { method, path: ['/api/workshop', ...segments].join('/'), file: relative(rootDir, file) }
  })
}

const routes = workshopRoutes()
const account = (role: string) => demoAccounts.find(a => a.role === role)!
const clients: Record<string, Client> = {}

beforeAll(async () => {
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
