// The built app as a phone and a load test see it: `npm run bench site` (after `npm run build`; with
// GW_OUTPUT_DIR it measures that build). Starts the built server on a free port with an in-memory demo
// database, then measures, in one run:
//  - Lighthouse (mobile, simulated throttling) on /, /cylinders, a product and /cart with Debian's Chromium
//    (CHROME_PATH, default /usr/bin/chromium): performance, accessibility, best practices, SEO, LCP,
//    whether every text answer was compressed, and the font files and bytes the page fetched;
//  - the JavaScript each public page loads at once (its module scripts and preloads, gzip), from the build;
//  - requests per second (autocannon, 10 connections) of /cylinders and /api/shop/products, each as a
//    share of /api/health's in the same run;
//  - the server's RSS after start and its highest during 30 s of load (with DATABASE_URL set, as
//    `npm run bench:pg site` does, the database is a throwaway PostgreSQL server outside the process);
//  - a 150 s 44.1 kHz 16-bit surface-test WAV sent to POST /api/workshop/surface-tests/analyse, against
//    `sox FILE -n stats` on the same file.
// A report, not a test: it prints a table with each goal and whether it is met, and exits 0 either way.
import { spawn, spawnSync } from 'node:child_process'
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { createServer } from 'node:net'
import { loadavg, tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { gzipSync } from 'node:zlib'
import { fileURLToPath } from 'node:url'
import autocannon from 'autocannon'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'

const rootDir = fileURLToPath(new URL('../..', import.meta.url))
const outputDir = resolve(rootDir, process.env.GW_OUTPUT_DIR ?? '.output')
const chromePath = process.env.CHROME_PATH ?? '/usr/bin/chromium'
const LOAD_SECONDS = 10

interface Row { measure: string, before: string, now: string, goal: string, met: boolean | null }
const rows: Row[] = []
const row = (measure: string, before: string, now: string, goal: string, met: boolean | null) => rows.push({ measure, before, now, goal, met })

function freePort(): Promise<number> {
  return new Promise((done, fail) => {
    const probe = createServer().once('error', fail).listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as { port: number }
      probe.close(() => done(port))
    })
  })
}

function rssMb(pid: number): number {
  const match = readFileSync(`/proc/${pid}/status`, 'utf8').match(/^VmRSS:\s+(\d+) kB/m)
  return match ? Number(match[1]) / 1024 : Number.NaN
}

const sleep = (ms: number) => new Promise(done => setTimeout(done, ms))

async function startServer() {
  const port = await freePort()
  const dataDir = mkdtempSync(join(tmpdir(), 'gw-bench-'))
  // The V8 heap ceiling and malloc settings below are those of `npm start` and `npm run serve`.
  const server = spawn(process.execPath, [`--max-old-space-size=${process.env.GW_HEAP_MB ?? '256'}`, join(outputDir, 'server/index.mjs')], {
    env: {
      ...process.env,
      PORT: String(port),
      HOST: '127.0.0.1',
      NUXT_SESSION_PASSWORD: 'bench-session-password-that-is-long-enough-0123456789',
      NUXT_DB_DIR: 'memory://',
      NUXT_DATA_DIR: dataDir,
      NUXT_UPLOADS_DIR: join(dataDir, 'uploads'),
      NUXT_SEED_DEMO: 'true',
      NUXT_SITE_URL: `http://127.0.0.1:${port}`,
      NUXT_PUBLIC_SITE_URL: `http://127.0.0.1:${port}`,
      NUXT_MAIL_POLL_MS: '60000',
      // As `npm start` and `npm run serve` run it (README › Configuration).
      MALLOC_ARENA_MAX: process.env.MALLOC_ARENA_MAX ?? '2',
      MALLOC_TRIM_THRESHOLD_: process.env.MALLOC_TRIM_THRESHOLD_ ?? '131072',
      MALLOC_MMAP_THRESHOLD_: process.env.MALLOC_MMAP_THRESHOLD_ ?? '131072',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  const base = `http://127.0.0.1:${port}`
  const deadline = Date.now() + 120_000
  while (Date.now() < deadline) {
    if (await fetch(`${base}/api/health`).then(r => r.ok, () => false)) break
    await sleep(200)
  }
  return { server, base, dataDir }
}

async function rate(url: string, seconds: number): Promise<number> {
  const result = await autocannon({ url, connections: 10, duration: seconds })
  return result.requests.average
}

/** The module scripts and preloads a page's HTML fetches at once, gzip bytes, from the build. */
async function firstLoadJs(base: string, path: string): Promise<{ gzip: number, zod: boolean }> {
  const html = await (await fetch(`${base}${path}`, { headers: { accept: 'text/html' } })).text()
  const srcs = new Set<string>()
  for (const match of html.matchAll(/<script[^>]*\ssrc="([^"]+)"|<link[^>]*rel="modulepreload"[^>]*href="([^"]+)"|<link[^>]*href="([^"]+)"[^>]*rel="modulepreload"/g)) {
    const src = match[1] ?? match[2] ?? match[3]!
    if (src.startsWith('/_nuxt/')) srcs.add(src)
  }
  let gzip = 0
  let zod = false
  for (const src of srcs) {
    const bytes = readFileSync(join(outputDir, 'public', src))
    gzip += gzipSync(bytes, { level: 9 }).byteLength
    zod ||= bytes.includes('ZodError') || bytes.includes('$ZodType')
  }
  return { gzip, zod }
}

/**
 * A short summary of each page's audit, kept in tests/bench/output/ (not committed): the scores, the timings
 * the performance score is made of, and the opportunities Lighthouse names with what they would save.
 */
function writeSummary(url: string, lhr: { categories: Record<string, { score: number | null } | undefined>, audits: Record<string, { numericValue?: number, score?: number | null, title?: string, details?: unknown } | undefined>, fetchTime?: string }) {
  const metric = (id: string) => lhr.audits[id]?.numericValue ?? null
  const opportunities = Object.entries(lhr.audits)
    .filter(([, audit]) => (audit?.details as { type?: string, overallSavingsMs?: number } | undefined)?.type === 'opportunity' && ((audit?.details as { overallSavingsMs?: number }).overallSavingsMs ?? 0) > 0)
    .map(([id, audit]) => ({ id, title: audit!.title, savingsMs: (audit!.details as { overallSavingsMs: number }).overallSavingsMs }))
  const summary = {
    url,
    fetchTime: lhr.fetchTime,
    loadAverage: loadavg().map(value => Number(value.toFixed(2))),
    scores: Object.fromEntries(Object.entries(lhr.categories).map(([id, category]) => [id, Math.round((category?.score ?? 0) * 100)])),
    metricsMs: { fcp: metric('first-contentful-paint'), lcp: metric('largest-contentful-paint'), tbt: metric('total-blocking-time'), speedIndex: metric('speed-index'), cls: metric('cumulative-layout-shift') },
    opportunities,
  }
  const folder = join(rootDir, 'tests/bench/output')
  mkdirSync(folder, { recursive: true })
  const name = new URL(url).pathname.replace(/^\/$/, 'home').replace(/^\//, '').replace(/\//g, '-')
  writeFileSync(join(folder, `lighthouse-${name}.json`), `${JSON.stringify(summary, null, 2)}\n`)
}

async function lighthouseOf(url: string) {
  const { default: lighthouse } = await import('lighthouse')
  const { launch } = await import('chrome-launcher')
  const chrome = await launch({ chromePath, chromeFlags: ['--headless=new', '--no-sandbox', '--disable-gpu'] })
  try {
    const result = await lighthouse(url, { port: chrome.port, output: 'json', logLevel: 'error', onlyCategories: ['performance', 'accessibility', 'best-practices', 'seo'] })
    const lhr = result!.lhr
    const score = (id: string) => Math.round((lhr.categories[id]?.score ?? 0) * 100)
    writeSummary(url, lhr)
    const requests = (lhr.audits['network-requests']?.details as { items?: { resourceType?: string, transferSize?: number, url: string }[] } | undefined)?.items ?? []
    const fonts = requests.filter(item => item.resourceType === 'Font')
    return {
      performance: score('performance'),
      accessibility: score('accessibility'),
      bestPractices: score('best-practices'),
      seo: score('seo'),
      lcpS: (lhr.audits['largest-contentful-paint']?.numericValue ?? 0) / 1000,
      cls: lhr.audits['cumulative-layout-shift']?.numericValue ?? 0,
      compressed: lhr.audits['uses-text-compression']?.score === 1,
      fontFiles: fonts.length,
      fontKiB: fonts.reduce((sum, item) => sum + (item.transferSize ?? 0), 0) / 1024,
    }
  }
  finally {
    await chrome.kill()
  }
}

async function surfaceRatio(base: string, dir: string) {
  const maker = demoAccounts.find(a => a.role === 'maker')!
  const login = await fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json', 'origin': base }, body: JSON.stringify({ email: maker.email, password: maker.password }) })
  const cookie = login.headers.getSetCookie().map(line => line.split(';')[0]).join('; ')
  const file = join(dir, 'surface.wav')
  const wav = makeSurfaceWav({ seconds: 150, sampleRate: 44100, bits: 16, levelDbfs: -50, swellDepth: 0.3, clicks: 12, seed: 7 })
  writeFileSync(file, wav)
  // The upload as before, through Node's FormData (which pushes the Blob through web streams 64 KB at a
  // time); beside it, for information, the same multipart body built once and written as it is, as a
  // browser sends a chosen file.
  const boundary = '----groovewright-bench-boundary'
  const body = Buffer.concat([
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="surface.wav"\r\nContent-Type: audio/wav\r\n\r\n`),
    wav,
    Buffer.from(`\r\n--${boundary}--\r\n`),
  ])
  const send = async (payload: Buffer | FormData, headers: Record<string, string>) => {
    const answer = await fetch(`${base}/api/workshop/surface-tests/analyse`, { method: 'POST', body: payload, headers: { origin: base, cookie, accept: 'application/json', ...headers } })
    if (!answer.ok) throw new Error(`analyse answered ${answer.status}: ${await answer.text()}`)
    await answer.arrayBuffer()
  }
  const upload = () => {
    const form = new FormData()
    form.append('file', new Blob([wav], { type: 'audio/wav' }), 'surface.wav')
    return send(form, {})
  }
  const uploadBuilt = () => send(body, { 'content-type': `multipart/form-data; boundary=${boundary}` })
  const sox = () => {
    if (spawnSync('sox', [file, '-n', 'stats']).status !== 0) throw new Error('sox failed')
  }
  const timed = async (run: () => Promise<void> | void) => {
    const start = performance.now()
    await run()
    return performance.now() - start
  }
  // One of each first (the route's code compiled, the file in the page cache), then the two interleaved,
  // so that a change in the shared machine's load falls on both; the best of each is compared.
  await timed(upload)
  await timed(sox)
  await timed(uploadBuilt)
  const uploads: number[] = []
  const builtUploads: number[] = []
  const soxes: number[] = []
  for (let i = 0; i < Number(process.env.BENCH_SURFACE_RUNS ?? 5); i++) {
    uploads.push(await timed(upload))
    soxes.push(await timed(sox))
    builtUploads.push(await timed(uploadBuilt))
  }
  const load = readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ')
  console.log(`surface test, ms (load ${load}): upload + analysis ${uploads.map(t => t.toFixed(0)).join(', ')}; sox ${soxes.map(t => t.toFixed(0)).join(', ')}; the same body built once ${builtUploads.map(t => t.toFixed(0)).join(', ')}`)
  const uploadMs = Math.min(...uploads)
  const soxMs = Math.min(...soxes)
  return { uploadMs, soxMs }
}

const uptime = readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ')
const { server, base, dataDir } = await startServer()
try {
  await sleep(3000)
  const rssStart = rssMb(server.pid!)
  const status = readFileSync(`/proc/${server.pid}/status`, 'utf8')
  console.log(`after start: ${status.match(/^VmRSS.*$/m)?.[0]}; ${status.match(/^RssAnon.*$/m)?.[0]}; ${status.match(/^RssFile.*$/m)?.[0]}`)

  // Throughput: health first, then the catalogue page and its API, in the same run.
  let rssPeak = rssStart
  const sampler = setInterval(() => {
    rssPeak = Math.max(rssPeak, rssMb(server.pid!))
  }, 250)
  // BENCH_SURFACE_ONLY=1 measures the surface-test upload alone (BENCH_SURFACE_RUNS runs, best taken).
  const surfaceOnly = process.env.BENCH_SURFACE_ONLY === '1'
  const health = surfaceOnly ? 1 : await rate(`${base}/api/health`, LOAD_SECONDS)
  const page = surfaceOnly ? 1 : await rate(`${base}/cylinders`, LOAD_SECONDS)
  const api = surfaceOnly ? 1 : await rate(`${base}/api/shop/products`, LOAD_SECONDS)
  clearInterval(sampler)
  const rssAfter = Math.max(rssPeak, rssMb(server.pid!))

  const catalogue = await (await fetch(`${base}/api/shop/products`)).json() as { items: { slug: string }[] }
  const pages = ['/', '/cylinders', `/cylinders/${catalogue.items[0]!.slug}`, '/cart']

  const surface = await surfaceRatio(base, dataDir)

  const before: Record<string, number> = { '/': 74, '/cylinders': 65, 'product': 76, '/cart': 76 }
  // BENCH_LIGHTHOUSE=0 leaves the page audits out (memory, throughput and the upload only).
  for (const path of process.env.BENCH_LIGHTHOUSE === '0' || surfaceOnly ? [] : pages) {
    const name = path.startsWith('/cylinders/') ? 'product' : path
    const scores = await lighthouseOf(`${base}${path}`)
    const js = await firstLoadJs(base, path)
    row(`Lighthouse mobile performance ${name}`, String(before[name]), `${scores.performance} (LCP ${scores.lcpS.toFixed(1)} s, CLS ${scores.cls.toFixed(3)})`, '≥ 95', scores.performance >= 95)
    row(`  accessibility / best practices / SEO ${name}`, '100/100/100', `${scores.accessibility}/${scores.bestPractices}/${scores.seo}`, '100 each', scores.accessibility === 100 && scores.bestPractices === 100 && scores.seo === 100)
    row(`  text compression ${name}`, 'none', scores.compressed ? 'all compressed' : 'some not', 'all', scores.compressed)
    row(`  fonts on first load ${name}`, '5 files, 106 KiB', `${scores.fontFiles} files, ${scores.fontKiB.toFixed(0)} KiB`, '≤ 3 files', scores.fontFiles <= 3)
    row(`  first-load JS ${name} (gzip)`, name === '/cylinders' ? '~120 KiB, zod in' : '', `${(js.gzip / 1024).toFixed(1)} KiB${js.zod ? ', zod in' : ', no zod'}`, name === '/cylinders' ? '≤ 90 KiB, no zod' : 'no zod', name === '/cylinders' ? js.gzip <= 90 * 1024 && !js.zod : !js.zod)
  }
  row('/cylinders SSR req/s ÷ /api/health req/s', '0.026', `${(page / health).toFixed(3)} (${page.toFixed(0)} / ${health.toFixed(0)})`, '≥ 0.15', page / health >= 0.15)
  row('/api/shop/products ÷ /api/health', '0.11', `${(api / health).toFixed(3)} (${api.toFixed(0)} / ${health.toFixed(0)})`, '≥ 0.5', api / health >= 0.5)
  row('server RSS after start', '~500 MB', `${rssStart.toFixed(0)} MB`, '≤ 250 MB', rssStart <= 250)
  row(`server RSS, highest during ${LOAD_SECONDS * 3} s of load`, 'up to 1 GB', `${rssAfter.toFixed(0)} MB`, '≤ 350 MB', rssAfter <= 350)
  const ratio = surface.uploadMs / surface.soxMs
  row('surface test upload + analysis ÷ sox stats (150 s WAV)', '≈ 30', `${ratio.toFixed(2)} (${surface.uploadMs.toFixed(0)} ms / ${surface.soxMs.toFixed(0)} ms)`, '≤ 2', ratio <= 2)
}
finally {
  server.kill()
  rmSync(dataDir, { recursive: true, force: true })
}

const widths = ['measure', 'before', 'now', 'goal'].map(key => Math.max(key.length, ...rows.map(r => String(r[key as keyof Row]).length)))
const line = (cells: string[]) => `| ${cells.map((cell, i) => cell.padEnd(widths[i] ?? 4)).join(' | ')} |`
const database = process.env.DATABASE_URL ? 'a PostgreSQL server (DATABASE_URL; `npm run bench:pg site`)' : 'embedded PGlite, in memory'
console.log(`\nBuild: ${outputDir}; database: ${database}; load average at start: ${uptime} (a shared machine makes the ratios noisy)\n`)
console.log(line(['measure', 'before', 'now', 'goal', 'met']))
console.log(line(widths.map(w => '-'.repeat(w)).concat('---')))
for (const r of rows) console.log(line([r.measure, r.before, r.now, r.goal, r.met === null ? '' : r.met ? 'yes' : 'NO']))
const missed = rows.filter(r => r.met === false).length
console.log(`\n${rows.length - missed} of ${rows.length} goals met.`)
