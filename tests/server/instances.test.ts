import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { chmodSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { createServer, request as forward, type Server } from 'node:http'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startMailFake } from '../../fakes/mail/server'
import { startS3Fake } from '../../fakes/s3/server'
import { startStripeFake } from '../../fakes/stripe/server'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { freePort, rootDir, waitFor } from './harness'

/*
 * Two instances of the built server behind one address, as README › Several instances sets them up:
 * one PostgreSQL database (a throwaway cluster from the machine's PostgreSQL packages), one S3-compatible
 * bucket (the s3rver stand-in), one session password, one site address (a small round-robin proxy here,
 * which also receives the payment webhooks), each started with `node scripts/serve.mjs`.
 */
const pgBin = existsSync('/usr/lib/postgresql')
  ? readdirSync('/usr/lib/postgresql').filter(version => existsSync(`/usr/lib/postgresql/${version}/bin/initdb`))
      .sort((a, b) => Number(a) - Number(b)).map(version => `/usr/lib/postgresql/${version}/bin`).pop()
  : undefined
const asRoot = process.getuid?.() === 0
const secret = 'whsec_instances_test'
const maker = demoAccounts.find(account => account.role === 'maker')!
const address = { name: 'Tamsin Reedy', line1: '4 Spindle Yard', city: 'Lowmere', postalCode: 'LM3 1CD', region: 'OR', country: 'US' }

/** Runs a PostgreSQL program as the `postgres` user when the tests run as root (initdb refuses root). */
function runPg(command: string) {
  const result = asRoot
    ? spawnSync('su', ['postgres', '-s', '/bin/bash', '-c', command], { encoding: 'utf8' })
    : spawnSync('bash', ['-c', command], { encoding: 'utf8' })
  if (result.status !== 0) throw new Error(`${command}: ${result.stdout}${result.stderr}`)
}

interface Instance { port: number, base: string, child: ChildProcess, exited: Promise<number | null> }

/** A visitor with its own cookies, talking to one instance directly; every change carries the site's Origin. */
class Visitor {
  cookie = ''
  constructor(public base: string, readonly site: string) {}
  async call(path: string, body?: unknown, headers: Record<string, string> = {}) {
    const response = await fetch(this.base + path, {
      method: body === undefined ? 'GET' : 'POST',
      headers: { 'accept': 'application/json', 'content-type': 'application/json', 'origin': this.site, ...(this.cookie ? { cookie: this.cookie } : {}), ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    })
    const setCookie = response.headers.getSetCookie()[0]
    if (setCookie) this.cookie = setCookie.split(';')[0]!
    const text = await response.text()
    let parsed: any = text
    try {
      parsed = JSON.parse(text)
    }
    catch { /* not JSON */ }
    return { status: response.status, body: parsed, headers: response.headers }
  }
}

// Skipped, saying why, only where no PostgreSQL is installed (CI has it: apt-get install postgresql).
describe.skipIf(!pgBin)(pgBin ? 'several instances behind one address' : 'several instances (skipped: no PostgreSQL binaries under /usr/lib/postgresql/*/bin)', () => {
  const work = mkdtempSync(join(tmpdir(), 'gw-instances-'))
  const pgDir = mkdtempSync(join(tmpdir(), 'gw-instances-pg-'))
  let pgPort = 0
  let mail: Awaited<ReturnType<typeof startMailFake>>
  let payments: Awaited<ReturnType<typeof startStripeFake>>
  let bucket: Awaited<ReturnType<typeof startS3Fake>>
  let proxy: Server
  let site = ''
  const instances: Instance[] = []
  let slugCounter = 0

  async function startInstance(env: Record<string, string>): Promise<Instance> {
    const port = await freePort()
    const child = spawn(process.execPath, [resolve(rootDir, 'scripts/serve.mjs')], {
      cwd: rootDir,
      stdio: ['ignore', 'ignore', 'pipe'],
      env: { ...process.env, ...env, PORT: String(port), HOST: '127.0.0.1' },
    })
    let said = ''
    child.stderr!.on('data', (chunk) => {
      said = (said + chunk).slice(-4000)
    })
    const exited = new Promise<number | null>(done => child.once('exit', code => done(code)))
    const base = `http://127.0.0.1:${port}`
    await waitFor(async () => child.exitCode === null ? fetch(`${base}/api/health`).then(r => r.ok, () => false) : Promise.reject(new Error(`instance on ${port} exited: ${said}`)), 90_000, `instance on ${port} to be healthy`)
    return { port, base, child, exited }
  }

  beforeAll(async () => {
    // The database: a cluster of its own on a free port, gone after the test.
    pgPort = await freePort()
    chmodSync(pgDir, 0o755)
    if (asRoot) spawnSync('chown', ['postgres', pgDir])
    runPg(`${pgBin}/initdb -D ${pgDir}/data -A trust -U postgres >/dev/null`)
    runPg(`${pgBin}/pg_ctl -D ${pgDir}/data -o '-p ${pgPort} -k ${pgDir} -c listen_addresses=127.0.0.1 -c max_connections=200' -l ${pgDir}/log -w start >/dev/null`)

    mail = await startMailFake({ smtpPort: 0, httpPort: 0, dir: join(work, 'mail'), quiet: true })
    payments = await startStripeFake({ port: 0, webhookUrl: null, webhookSecret: secret, quiet: true, retry: { attempts: 8, baseMs: 200 } })
    bucket = await startS3Fake({ port: 0, dir: join(work, 's3'), quiet: true })

    // The one address: round robin over the instances that are up; a refused connection tries the next.
    let next = 0
    proxy = createServer((req, res) => {
      const chunks: Buffer[] = []
      req.on('data', (chunk: Buffer) => chunks.push(chunk))
      req.on('end', () => {
        const attempt = (left: number) => {
          const target = instances[next++ % instances.length]!
          const out = forward({ host: '127.0.0.1', port: target.port, path: req.url, method: req.method, headers: { ...req.headers, 'x-forwarded-for': req.socket.remoteAddress ?? '' } }, (answer) => {
            res.writeHead(answer.statusCode ?? 502, answer.headers)
            answer.pipe(res)
          })
          out.on('error', () => left > 0 ? attempt(left - 1) : res.writeHead(502).end())
          out.end(Buffer.concat(chunks))
        }
        attempt(instances.length)
      })
    })
    const proxyPort = await freePort()
    await new Promise<void>(done => proxy.listen(proxyPort, '127.0.0.1', done))
    site = `http://127.0.0.1:${proxyPort}`
    payments.setWebhookUrl(`${site}/api/webhooks/stripe`)

    const env = {
      DATABASE_URL: `postgres://postgres@127.0.0.1:${pgPort}/postgres`,
      NUXT_SESSION_PASSWORD: 'instances-test-session-password-0123456789abcdef',
      NUXT_SITE_URL: site,
      NUXT_TRUST_PROXY: 'true',
      NUXT_SEED_DEMO: 'true',
      NUXT_SMTP_PORT: String(mail.smtpPort),
      NUXT_MAIL_POLL_MS: '150',
      NUXT_MAIL_MAX_BACKOFF_MS: '800',
      NUXT_STRIPE_API_PORT: String(payments.port),
      NUXT_STRIPE_WEBHOOK_SECRET: secret,
      NUXT_DATA_DIR: join(work, 'data'),
      ...bucket.env,
    }
    // Started together: one migrates and seeds under the database's locks, the other waits for it.
    instances.push(...await Promise.all([startInstance(env), startInstance(env)]))
  }, 150_000)

  afterAll(async () => {
    for (const instance of instances) instance.child.kill('SIGKILL')
    await Promise.all(instances.map(instance => instance.exited))
    if (proxy) {
      proxy.closeAllConnections()
      await new Promise(done => proxy.close(done))
    }
    await payments?.close()
    await mail?.close()
    await bucket?.close()
    if (existsSync(join(pgDir, 'data', 'postmaster.pid'))) runPg(`${pgBin}/pg_ctl -D ${pgDir}/data -m immediate stop >/dev/null`)
    rmSync(work, { recursive: true, force: true })
    rmSync(pgDir, { recursive: true, force: true })
  })

  const visitor = (index: number) => new Visitor(instances[index % 2]!.base, site)

  async function signedInMaker(index: number) {
    const client = visitor(index)
    const answer = await client.call('/api/auth/login', { email: maker.email, password: maker.password })
    expect(answer.status, JSON.stringify(answer.body)).toBe(200)
    return client
  }

  async function newProduct(stock: number) {
    const slug = `instances-test-${Date.now()}-${++slugCounter}`
    const answer = await (await signedInMaker(slugCounter)).call('/api/workshop/products', {
      slug, title: `Instances test blank ${slugCounter}`, kind: 'blank', format: 'two_minute', material: 'hard wax', priceMinor: 1400, stock,
    })
    expect(answer.status, JSON.stringify(answer.body)).toBe(201)
    return slug
  }

  const checkoutBody = (slug: string, email: string, extra: Record<string, unknown> = {}) => ({ items: [{ slug, qty: 1 }], email, shippingAddress: address, zone: 'domestic', ...extra })

  it('the demo seed runs once: both instances healthy and showing the same catalogue and orders', { timeout: 30_000 }, async () => {
    const seen = await Promise.all([0, 1].map(async (index) => {
      expect((await fetch(`${instances[index]!.base}/api/health`)).status).toBe(200)
      const catalogue = await visitor(index).call('/api/shop/products')
      expect(catalogue.status).toBe(200)
      const orders = await (await signedInMaker(index)).call('/api/workshop/orders?pageSize=200')
      expect(orders.status).toBe(200)
      return { catalogue: catalogue.body, orders: (orders.body.rows as { number: string }[]).map(row => row.number).sort() }
    }))
    expect(seen[1]).toEqual(seen[0])
    const slugs = JSON.stringify(seen[0]!.catalogue).match(/"slug":"[^"]+"/g) ?? []
    expect(slugs.length).toBeGreaterThan(0)
    expect(seen[0]!.orders.length).toBeGreaterThan(0)
    expect(new Set(seen[0]!.orders).size).toBe(seen[0]!.orders.length)
  })

  it('a sign-in made on one instance is honoured by the other (one session password)', async () => {
    const client = await signedInMaker(0)
    expect((await client.call('/api/auth/me')).body.email).toBe(maker.email)
    client.base = instances[1]!.base
    const there = await client.call('/api/auth/me')
    expect(there.status).toBe(200)
    expect(there.body.email).toBe(maker.email)
  })

  it('a photo uploaded through one instance is served by the other, byte ranges too (one bucket)', async () => {
    const client = await signedInMaker(0)
    const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 120, g: 90, b: 60 } } }).png().toBuffer()
    const form = new FormData()
    form.append('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'wax.png')
    const sent = await fetch(`${instances[0]!.base}/api/workshop/uploads/photo`, { method: 'POST', body: form, headers: { origin: site, cookie: client.cookie, accept: 'application/json' } })
    expect(sent.status).toBe(201)
    const { id } = await sent.json() as { id: string }
    client.base = instances[1]!.base
    const whole = await fetch(`${instances[1]!.base}/files/${id}`, { headers: { cookie: client.cookie } })
    expect(whole.status).toBe(200)
    expect(whole.headers.get('content-type')).toBe('image/webp')
    const bytes = Buffer.from(await whole.arrayBuffer())
    expect(bytes.subarray(8, 12).toString('latin1')).toBe('WEBP')
    const part = await fetch(`${instances[1]!.base}/files/${id}`, { headers: { cookie: client.cookie, range: 'bytes=4-15' } })
    expect(part.status).toBe(206)
    expect(part.headers.get('content-range')).toBe(`bytes 4-15/${bytes.byteLength}`)
    expect(Buffer.from(await part.arrayBuffer())).toEqual(bytes.subarray(4, 16))
    // Only the asked part is fetched from the bucket; a suffix and a range past the end behave as on disk.
    const tail = await fetch(`${instances[1]!.base}/files/${id}`, { headers: { cookie: client.cookie, range: 'bytes=-5' } })
    expect(tail.status).toBe(206)
    expect(Buffer.from(await tail.arrayBuffer())).toEqual(bytes.subarray(bytes.byteLength - 5))
    const beyond = await fetch(`${instances[1]!.base}/files/${id}`, { headers: { cookie: client.cookie, range: `bytes=${bytes.byteLength + 10}-` } })
    expect(beyond.status).toBe(416)
    expect(beyond.headers.get('content-range')).toBe(`bytes */${bytes.byteLength}`)
    // The object is in the bucket's folder, not on either instance's disk.
    expect(JSON.stringify(readdirSync(join(bucket.dir, bucket.bucket), { recursive: true }))).toContain(id)
  })

  it('a surface test\'s recording (held in shared memory for the analysis) is stored in the bucket and served by the other instance', async () => {
    const client = await signedInMaker(0)
    const register = await client.call('/api/workshop/blanks?state=shaved&pageSize=5')
    const code = (register.body.blanks ?? register.body.items ?? register.body.rows)[0].code as string
    const wav = makeSurfaceWav({ seconds: 8, sampleRate: 22_050, levelDbfs: -50, seed: 4 })
    const form = new FormData()
    form.append('file', new Blob([new Uint8Array(wav)], { type: 'audio/wav' }), 'play-through.wav')
    const sent = await fetch(`${instances[0]!.base}/api/workshop/blanks/${code}/surface-tests`, { method: 'POST', body: form, headers: { origin: site, cookie: client.cookie, accept: 'application/json' } })
    expect(sent.status, await sent.clone().text()).toBe(201)
    const { fileUrl } = await sent.json() as { fileUrl: string }
    const stored = await fetch(`${instances[1]!.base}${fileUrl}`, { headers: { cookie: client.cookie } })
    expect(stored.status).toBe(200)
    expect(Buffer.from(await stored.arrayBuffer())).toEqual(Buffer.from(wav))
  })

  it('40 concurrent checkouts for the last one in stock, split across both instances: exactly one sells', { timeout: 60_000 }, async () => {
    const slug = await newProduct(1)
    const answers = await Promise.all(Array.from({ length: 40 }, (_, index) => visitor(index).call('/api/checkout', checkoutBody(slug, `last-${index}@collectors.test`))))
    expect(answers.filter(answer => answer.status === 201)).toHaveLength(1)
    expect(answers.filter(answer => answer.status === 409)).toHaveLength(39)
    for (const index of [0, 1]) expect((await visitor(index).call(`/api/shop/products/${slug}`)).body.stock).toBe(0)
  })

  it('10 paid orders give exactly 10 confirmation mails, whichever instance sends them', { timeout: 60_000 }, async () => {
    const slug = await newProduct(50)
    const numbers: string[] = []
    await Promise.all(Array.from({ length: 10 }, async (_, index) => {
      const created = await visitor(index).call('/api/checkout', checkoutBody(slug, `paid-${index}@collectors.test`))
      expect(created.status, JSON.stringify(created.body)).toBe(201)
      numbers.push(created.body.orderNumber)
      const session = String(created.body.url).split('/').pop()
      const paid = await fetch(`${payments.url}/_fake/sessions/${session}/complete?wait=true`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })
      expect(paid.ok).toBe(true)
    }))
    const confirmations = () => mail.list().filter(message => numbers.some(number => message.subject === `Order ${number} is paid — thank you`))
    await waitFor(async () => confirmations().length >= 10, 20_000, 'ten confirmation mails')
    // Both outbox loops get several more passes (150 ms each), so a duplicate would be counted here.
    await new Promise(done => setTimeout(done, 1500))
    expect(confirmations()).toHaveLength(10)
    expect(new Set(confirmations().map(message => message.subject)).size).toBe(10)
  })

  it('SIGTERM of one instance during a burst of checkouts loses nothing: a retry on the other with the same key makes exactly N orders', { timeout: 60_000 }, async () => {
    const stock = 200
    const slug = await newProduct(stock)
    const buyers = 30
    const orders = new Map<number, string>()
    const bodies = new Map<number, Record<string, unknown>>()
    let firstAnswers = 0
    let retried = 0
    const finishedByStopped: number[] = []
    const [survivor, stopped] = [instances[0]!, instances[1]!]
    const pause = (ms: number) => new Promise(done => setTimeout(done, ms))
    /** One buyer: odd ones go to the instance that is stopped; anything but an answer is sent again to the other, same key. */
    async function buyer(index: number) {
      const body = checkoutBody(slug, `drain-${index}@collectors.test`, { checkoutKey: `instances-drain-key-${String(index).padStart(4, '0')}` })
      bodies.set(index, body)
      const first = await new Visitor((index % 2 ? stopped : survivor).base, site).call('/api/checkout', body).catch(() => null)
      if (first?.status === 201) {
        firstAnswers++
        if (index % 2) finishedByStopped.push(index)
        orders.set(index, first.body.orderNumber)
        return
      }
      // No answer (connection refused or cut), or the stopping instance's 503: sent again elsewhere.
      retried++
      const again = await new Visitor(survivor.base, site).call('/api/checkout', body)
      // 200: the stopped instance had made the order before the answer was lost; the key finds it.
      expect([200, 201], JSON.stringify(again.body)).toContain(again.status)
      orders.set(index, again.body.orderNumber)
    }
    // Buyers 0–17 arrive while both run; the stop comes once a few are answered, the rest in flight.
    const before = Array.from({ length: 18 }, async (_, index) => {
      await pause(index * 20)
      await buyer(index)
    })
    await waitFor(async () => firstAnswers >= 6, 15_000, 'a few checkouts answered')
    stopped.child.kill('SIGTERM')
    // Buyers 18–23 arrive while it stops, 24–29 after it has gone.
    const during = Array.from({ length: 6 }, async (_, index) => {
      await pause(index * 20)
      await buyer(18 + index)
    })
    expect(await stopped.exited).toBe(0)
    instances.splice(1, 1)
    const after = Array.from({ length: 6 }, (_, index) => buyer(24 + index))
    await Promise.all([...before, ...during, ...after])
    // Both paths were taken: checkouts the stopping instance finished, and checkouts sent again after it stopped.
    expect(finishedByStopped.length).toBeGreaterThan(0)
    expect(retried).toBeGreaterThan(0)
    expect(orders.size).toBe(buyers)
    expect(new Set(orders.values()).size).toBe(buyers)
    // A buyer whose answer from the stopped instance was lost sends again: the same order, nothing held twice.
    const resent = await new Visitor(survivor.base, site).call('/api/checkout', bodies.get(finishedByStopped[0]!))
    expect(resent.status).toBe(200)
    expect(resent.body.orderNumber).toBe(orders.get(finishedByStopped[0]!))
    expect((await new Visitor(survivor.base, site).call(`/api/shop/products/${slug}`)).body.stock).toBe(stock - buyers)
    const workshop = await signedInMaker(0)
    for (const number of orders.values()) {
      const order = await workshop.call(`/api/workshop/orders/${number}`)
      expect(order.status).toBe(200)
      expect(order.body.items.map((item: { quantity: number }) => item.quantity)).toEqual([1])
    }
  })
})

describe('starting an instance with shared uploads', () => {
  it('`npm run serve` with NUXT_UPLOADS_DRIVER=s3 and a setting missing refuses to start, naming each one', () => {
    const { NUXT_UPLOADS_S3_ENDPOINT: _endpoint, NUXT_UPLOADS_S3_SECRET_ACCESS_KEY: _secret, ...rest } = process.env
    const result = spawnSync(process.execPath, [resolve(rootDir, 'scripts/serve.mjs')], {
      cwd: rootDir,
      encoding: 'utf8',
      env: { ...rest, NUXT_SESSION_PASSWORD: 'instances-test-session-password-0123456789abcdef', NUXT_SITE_URL: 'https://cylinders.example.org', NUXT_UPLOADS_DRIVER: 's3', NUXT_UPLOADS_S3_BUCKET: 'uploads', NUXT_UPLOADS_S3_REGION: 'eu-central-1', NUXT_UPLOADS_S3_ACCESS_KEY_ID: 'key' },
      timeout: 20_000,
    })
    expect(result.status).toBe(1)
    expect(result.stderr).toMatch(/NUXT_UPLOADS_S3_ENDPOINT must be set/)
    expect(result.stderr).toMatch(/NUXT_UPLOADS_S3_SECRET_ACCESS_KEY must be set/)
    expect(result.stderr).not.toMatch(/NUXT_UPLOADS_S3_BUCKET/)
  })
})
