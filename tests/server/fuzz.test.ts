import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import fc from 'fast-check'
import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, rootDir, signedIn, useTestServer } from './harness'
import { fillPattern, routeTable } from './routeTable'
import type { RouteEntry } from './routeTable'

await useTestServer()

/*
 * Every route × hostile bodies, parameters and queries × every kind of caller: the server must answer
 * each with something below 500, never drop the connection, and still answer /api/health at the end.
 * Inputs come from fast-check with a seed printed at the start (FUZZ_SEED=<n> repeats a run).
 */

const seed = Number(process.env.FUZZ_SEED ?? Date.now() % 2_147_483_647)
const samplesPerCall = Number(process.env.FUZZ_SAMPLES ?? 16)

const routes: RouteEntry[] = [...routeTable('api', '/api'), ...routeTable('routes', '')]
// A backup dumps the whole database: a few calls say as much as many, and keep the run short.
const heavy = (route: RouteEntry) => route.pattern.includes('backup')
// Signing out would quietly turn a caller into a visitor for the rest of the run.
const signsOut = (route: RouteEntry) => /\/api\/auth\/logout/.test(route.pattern)

/** Field names the schemas know, so generated bodies get past "unknown field" into the checks behind. */
function schemaFieldNames(): string[] {
  const names = new Set<string>()
  for (const folder of ['shared/utils', 'server/utils']) {
    for (const file of readdirSync(join(rootDir, folder), { recursive: true, encoding: 'utf8' }).filter(name => name.endsWith('.ts'))) {
      for (const found of readFileSync(join(rootDir, folder, file), 'utf8').matchAll(/^\s+(\w+): /gm)) names.add(found[1]!)
    }
  }
  return [...names]
}

const hostileText = fc.constantFrom(
  '\u0000', 'GW\u0000-26', '%00', '\u001B[31m', '\u007F', '\uD800', '😀'.repeat(40), 'x'.repeat(70_000),
  '\'; drop table users; --', '<script>alert(1)</script>', '=1+1', '../../../../tmp/evil', '1e308', '-1e308',
  '99999999999999999999999', '2147483648', '7/16', '1 3/16', '1/0', '0/0', '11.1 mm', '-5 in', 'NaN',
  'Infinity', '', ' ', 'true', 'null', '2026-02-30', '0000-00-00', 'GW-26-0001', 'two_minute', 'maker',
)
const hostileNumber = fc.constantFrom(1e308, -1e308, 2147483648, -2147483649, 2 ** 53 + 2, 4294967296, 3e9, 0, -1, 0.5, 1e-300, 1e9)
const anyValue = fc.oneof(hostileText, hostileNumber, fc.string(), fc.double(), fc.integer(), fc.boolean(), fc.constant(null), fc.jsonValue({ maxDepth: 2 }))

function bodyArbitrary(fieldNames: string[]) {
  const field = fc.constantFrom(...fieldNames)
  return fc.oneof(
    { weight: 4, arbitrary: fc.dictionary(field, anyValue, { maxKeys: 6 }).map(body => ({ json: body })) },
    { weight: 1, arbitrary: fc.dictionary(field, fc.dictionary(field, anyValue, { maxKeys: 3 }), { maxKeys: 3 }).map(body => ({ json: body })) },
    { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 3 }).map(body => ({ json: body })) },
    { weight: 1, arbitrary: fc.constantFrom('{"a":', '\u0000', '[1,2', '['.repeat(20_000), `{"items":${'['.repeat(50_000)}${']'.repeat(50_000)}}`, 'x'.repeat(1000), '{"__proto__":{"x":1}}', '"\\u0000"').map(raw => ({ raw })) },
  )
}

const queryArbitrary = (fieldNames: string[]) => fc.dictionary(fc.constantFrom('q', 'page', 'pageSize', 'state', 'format', 'batch', 'sort', 'status', 'order', ...fieldNames.slice(0, 60)), fc.oneof(hostileText, fc.string()), { maxKeys: 4 })

/** Path parameters: the demo's real ones (to reach the checks behind the look-up) and hostile ones. */
const hostileParams = ['%00', 'a%00b', '%E0%A4%A', '%ff', '0', '-1', '3000000000', '99999999999999999999', '1e308', 'x'.repeat(300), '..%2F..%2Fetc', 'GW-99-9999', '%20']

function harvest(value: unknown, key: string, found = new Set<string>()): Set<string> {
  if (Array.isArray(value)) value.forEach(item => harvest(item, key, found))
  else if (value && typeof value === 'object') {
    for (const [name, item] of Object.entries(value)) {
      if (name === key && (typeof item === 'string' || typeof item === 'number')) found.add(String(item))
      else harvest(item, key, found)
    }
  }
  return found
}

const callers: Record<string, Client> = {}
const realParams: Record<string, string[]> = {}

beforeAll(async () => {
  const account = (role: string) => demoAccounts.find(a => a.role === role)!
  callers.visitor = new Client()
  for (const role of ['collector', 'shipper', 'maker']) callers[role] = await signedIn(account(role).email, account(role).password)
  const maker = callers.maker!
  const pick = (values: Set<string>) => [...values].slice(0, 4)
  realParams.code = pick(harvest((await maker.get('/api/workshop/blanks?pageSize=50')).body, 'code'))
  realParams.number = pick(harvest((await maker.get('/api/workshop/orders')).body, 'number'))
  realParams.slug = pick(harvest((await maker.get('/api/shop/products')).body, 'slug'))
  realParams.id = ['1', '2', ...pick(harvest((await maker.get('/api/workshop/tickets')).body, 'id'))]
})

interface Outcome { status: number, route: string, caller: string, detail: string }

async function send(client: Client, method: string, path: string, body?: { json?: unknown, raw?: string }): Promise<number> {
  if (method === 'GET' || method === 'HEAD') return (await client.request(path, { method })).status
  if (body?.raw !== undefined) return (await client.request(path, { method, rawBody: body.raw })).status
  return (await client.request(path, { method, body: body?.json ?? {} })).status
}

/** A multipart upload with a hostile name, content and fields, for the routes that take files. */
async function sendUpload(client: Client, path: string, fields: Record<string, unknown>, name: string, bytes: Uint8Array): Promise<number> {
  const form = new FormData()
  for (const [key, value] of Object.entries(fields)) form.append(key, typeof value === 'string' ? value : JSON.stringify(value))
  form.append('file', new Blob([bytes]), name)
  const cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(url(path), { method: 'POST', body: form, headers: { origin: new URL(url('/')).origin, ...(cookie ? { cookie } : {}) } })
  await response.arrayBuffer()
  return response.status
}

const uploadRoutes = /uploads\/(photo|audio)|surface-tests(\/analyse)?$|test-cuts$|\/cut$|\/claims$/

describe('fuzzing every route', () => {
  it('answers every hostile request below 500, drops no connection, and stays up', async () => {
    const fieldNames = schemaFieldNames()
    const bodies = fc.sample(bodyArbitrary(fieldNames), { numRuns: 4000, seed })
    const queries = fc.sample(queryArbitrary(fieldNames), { numRuns: 4000, seed: seed + 1 })
    const fileNames = ['../../../../tmp/evil', 'a\u0000.wav', '', 'x'.repeat(600), 'take.wav', 'photo.jpg', 'CON', '.htaccess']
    const fileBytes = fc.sample(fc.uint8Array({ maxLength: 2048 }), { numRuns: 200, seed: seed + 2 })
    const paramFor = (param: string, n: number) => {
      const pool = [...(realParams[param] ?? []), ...hostileParams]
      return pool[n % pool.length]!
    }

    const jobs: { route: string, caller: string, run: () => Promise<Outcome> }[] = []
    let n = 0
    const fuzzed = routes.filter(r => !signsOut(r))
    for (const route of fuzzed) {
      const samples = heavy(route) ? 1 : samplesPerCall
      for (const [callerName, client] of Object.entries(callers)) {
        for (let i = 0; i < samples; i++) {
          const k = n++
          const path = fillPattern(route.pattern, param => paramFor(param, k + i))
          const query = new URLSearchParams(queries[k % queries.length] as Record<string, string>).toString()
          const target = query && k % 2 === 0 ? `${path}?${query}` : path
          const body = bodies[k % bodies.length]!
          const useUpload = route.method === 'POST' && uploadRoutes.test(route.pattern) && k % 2 === 1
          const described = `${route.method} ${target.slice(0, 160)}${useUpload ? ' (multipart)' : ''}`
          jobs.push({
            route: described,
            caller: callerName,
            run: async () => {
              const status = useUpload
                ? await sendUpload(client, target, (body.json && typeof body.json === 'object' ? body.json : {}) as Record<string, unknown>, fileNames[k % fileNames.length]!, fileBytes[k % fileBytes.length]!)
                : await send(client, route.method, target, body)
              return { status, route: described, caller: callerName, detail: useUpload ? 'multipart' : JSON.stringify(body).slice(0, 200) }
            },
          })
        }
      }
    }

    const failures: Outcome[] = []
    let dropped = 0
    let sent = 0
    const worker = async () => {
      for (let job = jobs.shift(); job; job = jobs.shift()) {
        sent++
        try {
          const outcome = await job.run()
          if (outcome.status >= 500) failures.push(outcome)
        }
        catch (error) {
          dropped++
          // fetch's own error says only "fetch failed"; its cause says how (reset, closed, timed out).
          const cause = (error as { cause?: { code?: string, message?: string } }).cause
          failures.push({ status: 0, route: job.route, caller: job.caller, detail: `${String(error)}: ${cause?.code ?? ''} ${cause?.message ?? ''}`.trim() })
        }
      }
    }
    await Promise.all(Array.from({ length: 6 }, worker))

    const health = await fetch(url('/api/health'))
    console.log(`[fuzz] seed ${seed}: ${sent} requests over ${fuzzed.length} of the ${routes.length} routes (sign-outs left out) × ${Object.keys(callers).length} callers; ${failures.length - dropped} answers of 5xx, ${dropped} dropped connections; health ${health.status}`)
    expect(sent).toBeGreaterThanOrEqual(5000)
    expect(failures.slice(0, 20)).toEqual([])
    expect(dropped).toBe(0)
    expect(health.status).toBe(200)
  }, 600_000)
})
