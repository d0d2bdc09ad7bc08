// Blank register benchmark: `node --import tsx tests/bench/blanks.bench.ts` (or `npm run bench blanks`).
//
// Starts the built server (GW_OUTPUT_DIR, default .output; `npm run build` first) on a free port with
// an in-memory database and the demo seed (for the maker's sign-in), enters 2,000 blanks through the
// API (some reamed, some shaved, so the states differ), then times the register's list, filter and
// page requests over HTTP: p50 and p95 of 50 requests each, after a warm-up. Goal (issue 6): under
// 200 ms a request.
import { spawn } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { demoAccounts } from '../../shared/utils/demoAccounts'

const BLANKS = 2000
const PER_REQUEST = 100
const RUNS = 50
const GOAL_MS = 200

const root = fileURLToPath(new URL('../..', import.meta.url))
const outputDir = resolve(root, process.env.GW_OUTPUT_DIR ?? '.output')
const entry = join(outputDir, 'server/index.mjs')
if (!existsSync(entry)) {
  console.error(`No built server at ${entry}: run \`npm run build\` (or set GW_OUTPUT_DIR) first.`)
  process.exit(1)
}

function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const probe = createServer()
    probe.once('error', reject)
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as { port: number }
      probe.close(() => resolvePort(port))
    })
  })
}

const port = await freePort()
const base = `http://127.0.0.1:${port}`
const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-bench-uploads-'))
const server = spawn(process.execPath, [entry], {
  stdio: ['ignore', 'ignore', 'inherit'],
  env: {
    ...process.env,
    PORT: String(port),
    NUXT_SITE_URL: base,
    NUXT_DB_DIR: 'memory://',
    NUXT_UPLOADS_DIR: uploadsDir,
    NUXT_SESSION_PASSWORD: randomBytes(32).toString('hex'),
    // No mail server is needed: the outbox keeps what it cannot send.
    NUXT_SMTP_PORT: '9',
    NUXT_SEED_DEMO: 'true',
  },
})

let cookie = ''
async function call(path: string, init: { method?: string, body?: unknown } = {}) {
  const response = await fetch(`${base}${path}`, {
    method: init.method ?? (init.body ? 'POST' : 'GET'),
    headers: { 'accept': 'application/json', 'origin': base, 'content-type': 'application/json', ...(cookie ? { cookie } : {}) },
    body: init.body ? JSON.stringify(init.body) : undefined,
  })
  const setCookie = response.headers.getSetCookie()[0]
  if (setCookie) cookie = setCookie.split(';')[0]!
  const text = await response.text()
  if (!response.ok) throw new Error(`${init.method ?? 'GET'} ${path}: ${response.status} ${text.slice(0, 300)}`)
  return text ? JSON.parse(text) : null
}

/** Runs `task` over `items` with `width` requests in flight. */
async function inParallel<T>(items: T[], width: number, task: (item: T) => Promise<unknown>) {
  let next = 0
  await Promise.all(Array.from({ length: width }, async () => {
    while (next < items.length) await task(items[next++]!)
  }))
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!

try {
  const started = Date.now()
  for (;;) {
    if (server.exitCode !== null) throw new Error(`the server stopped (exit ${server.exitCode})`)
    const health = await fetch(`${base}/api/health`).catch(() => null)
    if (health?.ok) break
    if (Date.now() - started > 120_000) throw new Error('the server did not answer /api/health within 2 minutes')
    await new Promise(done => setTimeout(done, 250))
  }
  const maker = demoAccounts.find(account => account.role === 'maker')!
  await call('/api/auth/login', { body: { email: maker.email, password: maker.password } })

  const stamp = Date.now().toString(36).toUpperCase()
  const batches = []
  for (let i = 1; i <= 3; i++) {
    batches.push(await call('/api/workshop/batches', { body: { code: `BENCH-${stamp}-${i}`, formula: `stearic acid ${60 + i * 5} / paraffin ${40 - i * 5}`, pourDate: `2026-0${i}-15`, volumetricExpansionPerK: 0.0007 } }))
  }

  let t0 = performance.now()
  const creations = Array.from({ length: BLANKS / PER_REQUEST }, (_, i) => ({ batchId: batches[i % 3].id, format: i % 2 ? 'four_minute' : 'two_minute', count: PER_REQUEST, diameterIn: (2.2 + (i % 7) * 0.001).toFixed(3), location: `Rack ${i % 4}` }))
  const codes: string[] = []
  await inParallel(creations, 4, async body => codes.push(...(await call('/api/workshop/blanks', { body })).codes))
  const createMs = performance.now() - t0
  // Some blanks move on, so the register holds several states: 400 reamed, 200 of them shaved.
  t0 = performance.now()
  const reamed = codes.filter((_, i) => i % 5 === 0)
  await inParallel(reamed, 4, code => call(`/api/workshop/blanks/${code}/reaming`, { body: { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 } }))
  const shaved = reamed.filter((_, i) => i % 2 === 0)
  await inParallel(shaved, 4, code => call(`/api/workshop/blanks/${code}/shaving`, { body: { wheelDegrees: 45, passes: 1, diameterAfterIn: '2.194' } }))
  const moveMs = performance.now() - t0
  const total = (await call('/api/workshop/blanks?pageSize=1')).total as number
  console.log(`register: ${total} blanks (${codes.length} entered in ${BLANKS / PER_REQUEST} requests, ${(createMs / 1000).toFixed(1)} s; ${reamed.length} reamed and ${shaved.length} shaved in ${(moveMs / 1000).toFixed(1)} s)`)

  const some = codes[1234]!
  const cases: [string, string][] = [
    ['first page (25, newest codes first)', '/api/workshop/blanks'],
    ['filter by state (reamed)', '/api/workshop/blanks?state=reamed'],
    ['filter by state + format + batch', `/api/workshop/blanks?state=cast&format=four_minute&batch=${batches[1].code}`],
    ['search by code', `/api/workshop/blanks?q=${some.slice(-4)}`],
    ['deep page (page 60 of 80)', '/api/workshop/blanks?page=60'],
    ['sort by diameter, 100 a page', '/api/workshop/blanks?sort=diameter_asc&pageSize=100&page=3'],
    ['one blank with its logs', `/api/workshop/blanks/${shaved[7]}`],
  ]
  console.log(`\n${'request'.padEnd(40)} ${'p50'.padStart(8)} ${'p95'.padStart(8)} ${'max'.padStart(8)}  rows`)
  let worstP95 = 0
  for (const [name, path] of cases) {
    for (let i = 0; i < 5; i++) await call(path)
    const times: number[] = []
    let rows = 0
    for (let i = 0; i < RUNS; i++) {
      const t = performance.now()
      const answer = await call(path)
      times.push(performance.now() - t)
      rows = answer.rows?.length ?? 1
    }
    times.sort((a, b) => a - b)
    const p95 = percentile(times, 95)
    worstP95 = Math.max(worstP95, p95)
    console.log(`${name.padEnd(40)} ${percentile(times, 50).toFixed(1).padStart(6)} ms ${p95.toFixed(1).padStart(6)} ms ${times.at(-1)!.toFixed(1).padStart(6)} ms  ${rows}`)
  }
  t0 = performance.now()
  const csv = await fetch(`${base}/api/workshop/exports/blanks.csv`, { headers: { cookie } }).then(response => response.text())
  console.log(`\nCSV export of the whole register: ${csv.trim().split('\r\n').length - 1} rows in ${(performance.now() - t0).toFixed(0)} ms`)
  console.log(`\nGoal: every request under ${GOAL_MS} ms (p95). Worst p95: ${worstP95.toFixed(1)} ms — ${worstP95 < GOAL_MS ? 'met' : 'NOT met'}.`)
  process.exitCode = worstP95 < GOAL_MS ? 0 : 1
}
catch (error) {
  console.error(error instanceof Error ? error.message : error)
  process.exitCode = 1
}
finally {
  server.kill('SIGTERM')
  await new Promise(done => server.exitCode !== null ? done(null) : server.once('exit', done))
  rmSync(uploadsDir, { recursive: true, force: true })
}
