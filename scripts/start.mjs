// `npm start`: build if the sources changed, keep a session password in .data/, start the local
// stand-ins for hosted services and the server, then print where everything is. Ctrl-C stops all.
import { spawn, spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'

const root = new URL('..', import.meta.url).pathname
process.chdir(root)
const port = Number(process.env.PORT ?? 3000)
const mailSmtpPort = Number(process.env.MAIL_FAKE_SMTP_PORT ?? 2525)
const mailHttpPort = Number(process.env.MAIL_FAKE_HTTP_PORT ?? 8025)
const stripePort = Number(process.env.STRIPE_FAKE_PORT ?? 12111)
const siteUrl = process.env.NUXT_SITE_URL ?? `http://localhost:${port}`

function newestMtime(path) {
  if (!existsSync(path)) return 0
  const stat = statSync(path)
  if (!stat.isDirectory()) return stat.mtimeMs
  return Math.max(stat.mtimeMs, ...readdirSync(path).map(name => newestMtime(join(path, name))))
}

const sources = ['app', 'server', 'shared', 'content', 'public', 'drizzle', 'nuxt.config.ts', 'tailwind.config.ts', 'package-lock.json']
const outputDir = process.env.GW_OUTPUT_DIR ?? '.output'
const built = existsSync(`${outputDir}/nitro.json`) ? statSync(`${outputDir}/nitro.json`).mtimeMs : 0
if (Math.max(...sources.map(newestMtime)) > built) {
  console.log('Building the app (first start or changed sources)…')
  const result = spawnSync('npx', ['nuxt', 'build'], { stdio: 'inherit' })
  if (result.status !== 0) process.exit(result.status ?? 1)
}

const dataDir = process.env.NUXT_DATA_DIR ?? '.data'
mkdirSync(dataDir, { recursive: true })
let sessionPassword = process.env.NUXT_SESSION_PASSWORD
if (!sessionPassword) {
  const file = join(dataDir, 'session-password')
  if (!existsSync(file)) writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 })
  sessionPassword = readFileSync(file, 'utf8').trim()
}

// A one-time code for /setup when the shop has no maker yet (a shop started with NUXT_SEED_DEMO=false).
const setupCode = process.env.NUXT_SETUP_TOKEN || randomBytes(18).toString('base64url')
// SEED_DEMO is accepted as another name for NUXT_SEED_DEMO.
const seedDemo = process.env.NUXT_SEED_DEMO ?? process.env.SEED_DEMO ?? 'true'

const children = []
function run(name, args, env = {}) {
  const child = spawn(process.execPath, args, { stdio: ['ignore', 'inherit', 'inherit'], env: { ...process.env, ...env } })
  child.on('exit', (code, signal) => {
    if (!stopping) {
      console.error(`[${name}] stopped (${signal ?? code}); stopping everything.`)
      stop(1)
    }
  })
  children.push(child)
  return child
}

let stopping = false
function stop(code = 0) {
  if (stopping) return
  stopping = true
  for (const child of children) child.kill('SIGTERM')
  setTimeout(() => process.exit(code), 1500).unref()
  Promise.all(children.map(child => new Promise(resolve => child.exitCode !== null ? resolve() : child.on('exit', resolve))))
    .then(() => process.exit(code))
}
process.on('SIGINT', () => stop(0))
process.on('SIGTERM', () => stop(0))

run('mail', ['--import', 'tsx', 'fakes/mail/server.ts'], { MAIL_FAKE_SMTP_PORT: String(mailSmtpPort), MAIL_FAKE_HTTP_PORT: String(mailHttpPort) })
run('payments', ['--import', 'tsx', 'fakes/stripe/server.ts'], {
  STRIPE_FAKE_PORT: String(stripePort),
  STRIPE_FAKE_WEBHOOK_URL: `http://127.0.0.1:${port}/api/webhooks/stripe`,
})
// A 256 MB ceiling for V8's old generation (what V8 picks by itself on a 1 GB machine; the server's live heap
// is about 65 MB) makes it collect before it grows: about 130 MB less resident memory under load. GW_HEAP_MB
// changes it (README › Configuration).
run('server', [`--max-old-space-size=${process.env.GW_HEAP_MB ?? '256'}`, `${outputDir}/server/index.mjs`], {
  PORT: String(port),
  HOST: process.env.HOST ?? '127.0.0.1',
  NUXT_SESSION_PASSWORD: sessionPassword,
  NUXT_SITE_URL: siteUrl,
  NUXT_SMTP_PORT: String(mailSmtpPort),
  NUXT_STRIPE_API_PORT: String(stripePort),
  NUXT_SEED_DEMO: seedDemo,
  NUXT_SETUP_TOKEN: setupCode,
  // Two malloc arenas instead of one per thread: about 70 MB less resident memory for the same work
  // (README › Configuration).
  MALLOC_ARENA_MAX: process.env.MALLOC_ARENA_MAX ?? '2',
  // Fixed trim and mmap thresholds: glibc gives freed memory back instead of raising both as the
  // database's start frees large blocks (about 50 MB less resident memory after start).
  MALLOC_TRIM_THRESHOLD_: process.env.MALLOC_TRIM_THRESHOLD_ ?? '131072',
  MALLOC_MMAP_THRESHOLD_: process.env.MALLOC_MMAP_THRESHOLD_ ?? '131072',
})

const deadline = Date.now() + 120_000
while (Date.now() < deadline && !stopping) {
  try {
    const response = await fetch(`http://127.0.0.1:${port}/api/health`)
    if (response.ok) break
  }
  catch { /* not up yet */ }
  await new Promise(resolve => setTimeout(resolve, 300))
}

const { demoAccounts } = await import('../shared/utils/demoAccounts.ts').catch(() => ({ demoAccounts: null }))
const setupNeeded = await fetch(`http://127.0.0.1:${port}/api/setup`).then(r => r.json()).then(b => b.needed === true, () => false)
console.log(`
Groovewright is running.
  Shop:          ${siteUrl}
  Mail inbox:    http://127.0.0.1:${mailHttpPort}/  (every e-mail the shop sends lands here)
  Payments:      local test checkout on http://127.0.0.1:${stripePort}/ (no real money moves)`)
if (setupNeeded) console.log(`  First maker:   ${siteUrl}/setup#code=${setupCode}  (no maker account yet: make one here)`)
if (seedDemo !== 'false') {
  console.log('  Demo sign-ins:')
  for (const account of demoAccounts ?? []) console.log(`    ${account.role.padEnd(10)} ${account.email.padEnd(30)} ${account.password}`)
}
console.log('\nPress Ctrl-C to stop.')
