import { mkdtempSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import pg from 'pg'
import { beforeAll, expect } from 'vitest'
import { setup, url } from '@nuxt/test-utils/e2e'
import { startMailFake } from '../../fakes/mail/server'
import { startStripeFake } from '../../fakes/stripe/server'
import { demoAccounts } from '../../shared/utils/demoAccounts'

export const rootDir = fileURLToPath(new URL('../..', import.meta.url))

/** A port nothing listens on now, for a server whose address a test must know before it starts. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer().once('error', reject).listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as { port: number }
      probe.close(() => resolve(port))
    })
  })
}

export type MailFake = Awaited<ReturnType<typeof startMailFake>>
export const webhookSecret = 'whsec_test_harness_secret'

/**
 * Starts the mail fake in this process on free ports, then the built server (`npm run build` first)
 * with an in-memory database and fast mail retries. Call at the top level of a test file.
 */
export async function useTestServer(env: Record<string, string> = {}, options: { port?: number } = {}) {
  const mailDir = mkdtempSync(join(tmpdir(), 'gw-mail-'))
  const mail = { fake: await startMailFake({ smtpPort: 0, httpPort: 0, dir: mailDir, quiet: true }), dir: mailDir }
  const payments = await startStripeFake({ port: 0, webhookUrl: null, webhookSecret, quiet: true, retry: { attempts: 6, baseMs: 200 } })
  const database = await freshServerDatabase()
  // Each test server keeps its files (uploads, backups) in a folder of its own, so one test's backup
  // never reads what other runs left behind.
  const dataDir = mkdtempSync(join(tmpdir(), 'gw-data-'))
  await setup({
    rootDir,
    build: false,
    server: true,
    browser: false,
    setupTimeout: 120_000,
    ...(options.port ? { port: options.port } : {}),
    nuxtConfig: { nitro: { output: { dir: resolve(rootDir, process.env.GW_OUTPUT_DIR ?? '.output') } } },
    env: {
      NUXT_SESSION_PASSWORD: 'test-session-password-that-is-long-enough-0123456789',
      NUXT_DB_DIR: 'memory://',
      NUXT_DATA_DIR: dataDir,
      NUXT_UPLOADS_DIR: join(dataDir, 'uploads'),
      NUXT_SMTP_PORT: String(mail.fake.smtpPort),
      NUXT_MAIL_POLL_MS: '150',
      NUXT_MAIL_MAX_BACKOFF_MS: '800',
      NUXT_SEED_DEMO: 'true',
      NUXT_STRIPE_API_PORT: String(payments.port),
      NUXT_STRIPE_WEBHOOK_SECRET: webhookSecret,
      // The built server runs with NODE_ENV=production here: only warnings and errors, unless a test or LOG_LEVEL asks.
      LOG_LEVEL: process.env.LOG_LEVEL ?? 'warn',
      ...(database ? { DATABASE_URL: database } : {}),
      ...env,
    },
  })
  // setup() starts the server in its own beforeAll; this one runs after it, when the address is known.
  beforeAll(async () => {
    payments.setWebhookUrl(url('/api/webhooks/stripe'))
    // The server answers before its start-up work (migrations, demo seed) is done; health waits for it.
    const deadline = Date.now() + 60_000
    while (Date.now() < deadline && !(await fetch(url('/api/health')).then(r => r.ok, () => false))) {
      await new Promise(resolve => setTimeout(resolve, 100))
    }
  }, 70_000)
  return Object.assign(mail, { payments })
}

/**
 * With TEST_DATABASE_URL (a PostgreSQL server), each test file gets a database of its own, so the
 * same tests run against the embedded database and against a server.
 */
async function freshServerDatabase(): Promise<string | undefined> {
  const admin = process.env.TEST_DATABASE_URL
  if (!admin) return undefined
  const name = `gw_test_${Date.now()}_${Math.random().toString(36).slice(2, 8)}`
  const client = new pg.Client({ connectionString: admin })
  await client.connect()
  await client.query(`create database ${name}`)
  await client.end()
  const url = new URL(admin)
  url.pathname = `/${name}`
  return url.toString()
}

export interface Answer<T = any> {
  status: number
  body: T
  headers: Headers
}

function isSocketClosed(error: unknown): boolean {
  const cause = (error as { cause?: { code?: string } })?.cause
  return cause?.code === 'UND_ERR_SOCKET'
}

/** A browser-like client: keeps its own cookies and sends this site's Origin on every request. */
export class Client {
  cookies = new Map<string, string>()

  async request<T = any>(path: string, options: { method?: string, body?: unknown, rawBody?: string, headers?: Record<string, string>, origin?: string | null } = {}): Promise<Answer<T>> {
    const target = url(path)
    const headers: Record<string, string> = { accept: 'application/json', ...options.headers }
    const origin = options.origin === undefined ? new URL(target).origin : options.origin
    if (origin) headers.origin = origin
    if (this.cookies.size) headers.cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    let body: string | undefined
    if (options.rawBody !== undefined) {
      body = options.rawBody
      headers['content-type'] ??= 'application/json'
    }
    else if (options.body !== undefined) {
      body = JSON.stringify(options.body)
      headers['content-type'] = 'application/json'
    }
    const method = options.method ?? (body ? 'POST' : 'GET')
    const send = () => fetch(target, { method, headers, body, redirect: 'manual' })
    const response = await send().catch((error: unknown) => {
      // A kept-alive connection the server closed for idleness just as it was reused (a race of timers
      // on a loaded machine): a read is sent once more on a fresh one. A server that really drops the
      // request drops it again, so the second try still fails.
      if ((method === 'GET' || method === 'HEAD') && isSocketClosed(error)) return send()
      throw error
    })
    for (const line of response.headers.getSetCookie()) {
      const [pair] = line.split(';')
      const [name, ...rest] = pair!.split('=')
      const value = rest.join('=')
      if (!value || /max-age=0|expires=thu, 01 jan 1970/i.test(line)) this.cookies.delete(name!.trim())
      else this.cookies.set(name!.trim(), value)
    }
    const text = await response.text()
    let parsed: unknown = text
    try {
      parsed = JSON.parse(text)
    }
    catch { /* not JSON */ }
    return { status: response.status, body: parsed as T, headers: response.headers }
  }

  post<T = any>(path: string, body?: unknown, extra: { origin?: string | null, headers?: Record<string, string> } = {}) {
    return this.request<T>(path, { method: 'POST', body: body ?? {}, ...extra })
  }

  get<T = any>(path: string) {
    return this.request<T>(path)
  }

  put<T = any>(path: string, body: unknown) {
    return this.request<T>(path, { method: 'PUT', body })
  }
}

export async function signedIn(email: string, password: string): Promise<Client> {
  const client = new Client()
  const answer = await client.post('/api/auth/login', { email, password })
  if (answer.status !== 200) throw new Error(`sign-in of ${email} failed: ${answer.status} ${JSON.stringify(answer.body)}`)
  return client
}

export async function waitFor<T>(probe: () => Promise<T | undefined | null | false>, timeoutMs = 15_000, what = 'condition'): Promise<T> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    const value = await probe()
    if (value) return value
    await new Promise(resolve => setTimeout(resolve, 100))
  }
  throw new Error(`timed out waiting for ${what}`)
}

/** A GET (no body) or POST (JSON) to the payment stand-in's own test controls, answered as JSON. */
export async function askPaymentFake(payments: { url: string }, path: string, body?: unknown) {
  const response = await fetch(`${payments.url}${path}`, { method: body === undefined ? 'GET' : 'POST', headers: { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) })
  return await response.json() as any
}

/** A multipart POST as the browser sends it (cookie and this site's Origin); the answer's body parsed if JSON. */
export async function postMultipart(client: Client, path: string, files: { field: string, name: string, bytes: Uint8Array, type: string }[], fields: Record<string, string> = {}): Promise<{ status: number, body: any }> {
  const form = new FormData()
  for (const file of files) form.append(file.field, new Blob([file.bytes], { type: file.type }), file.name)
  for (const [name, value] of Object.entries(fields)) form.append(name, value)
  const target = url(path)
  const cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(target, { method: 'POST', body: form, headers: { origin: new URL(target).origin, accept: 'application/json', ...(cookie ? { cookie } : {}) } })
  const text = await response.text()
  let body: any = text
  try {
    body = JSON.parse(text)
  }
  catch { /* not JSON */ }
  return { status: response.status, body }
}

/**
 * The workshop set-up the production tests share: the demo maker signed in, the surface-test coverage
 * rule relaxed to 1 % (these tests use short synthetic takes; the rule itself is tested in
 * workshop-truth.test.ts), one wax batch and one recorder of the given names.
 */
export async function workshopBench(names: { batchCode: string, formula: string, recorderName: string, horn: string }) {
  const makerAccount = demoAccounts.find(a => a.role === 'maker')!
  const maker = await signedIn(makerAccount.email, makerAccount.password)
  expect((await maker.put('/api/workshop/settings/surface', { coveragePercent: 1 })).status).toBe(200)
  const batch = await maker.post('/api/workshop/batches', { code: names.batchCode, formula: names.formula, pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075, softeningPointC: 62 })
  expect(batch.status, JSON.stringify(batch.body)).toBe(201)
  const recorder = await maker.post('/api/workshop/recorders', { name: names.recorderName, stylus: 'sapphire', horn: names.horn })
  expect(recorder.status, JSON.stringify(recorder.body)).toBe(201)
  return { maker, batchId: batch.body.id as number, recorderId: recorder.body.id as number }
}
