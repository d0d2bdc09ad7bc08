import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startMailFake } from '../../fakes/mail/server'
import { startStripeFake } from '../../fakes/stripe/server'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { rootDir } from './harness'

// Kill-and-restart: the embedded database must come back whole after the server dies mid-write.
// (Against a PostgreSQL server the durability is the server's own; this test is for PGlite.)
const embedded = !process.env.TEST_DATABASE_URL
const secret = 'whsec_crash_test'
const dataDir = mkdtempSync(join(tmpdir(), 'gw-crash-'))
const maker = demoAccounts.find(a => a.role === 'maker')!

async function freePort() {
  return await new Promise<number>((done) => {
    const probe = createServer().listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as { port: number }
      probe.close(() => done(port))
    })
  })
}

class Shop {
  cookie = ''
  constructor(readonly base: string) {}
  async call(path: string, body?: unknown) {
    const response = await fetch(this.base + path, {
      method: body === undefined ? 'GET' : 'POST',
      headers: { 'content-type': 'application/json', 'origin': this.base, ...(this.cookie ? { cookie: this.cookie } : {}) },
      body: body === undefined ? undefined : JSON.stringify(body),
    })
    const setCookie = response.headers.getSetCookie()[0]
    if (setCookie) this.cookie = setCookie.split(';')[0]!
    const text = await response.text()
    return { status: response.status, body: text ? JSON.parse(text) : null }
  }
}

describe.skipIf(!embedded)('crash safety of the embedded database', () => {
  let mail: Awaited<ReturnType<typeof startMailFake>>
  let payments: Awaited<ReturnType<typeof startStripeFake>>
  let server: ChildProcess | undefined
  let base = ''
  let port = 0
  const answered = new Set<string>()
  const initialStock = 100_000

  beforeAll(async () => {
    mail = await startMailFake({ smtpPort: 0, httpPort: 0, dir: mkdtempSync(join(tmpdir(), 'gw-crash-mail-')), quiet: true })
    payments = await startStripeFake({ port: 0, webhookUrl: null, webhookSecret: secret, quiet: true, retry: { attempts: 10, baseMs: 150 } })
    port = await freePort()
    base = `http://127.0.0.1:${port}`
    payments.setWebhookUrl(`${base}/api/webhooks/stripe`)
  })

  async function start(dbDir = dataDir, uploadsDir = join(dataDir, 'uploads')) {
    server = spawn(process.execPath, [resolve(rootDir, process.env.GW_OUTPUT_DIR ?? '.output', 'server/index.mjs')], {
      stdio: 'ignore',
      env: {
        ...process.env,
        PORT: String(port),
        HOST: '127.0.0.1',
        NUXT_DB_DIR: dbDir,
        NUXT_UPLOADS_DIR: uploadsDir,
        NUXT_BACKUP_DIR: join(dataDir, 'backups'),
        NUXT_SESSION_PASSWORD: 'crash-test-session-password-0123456789abcdef',
        NUXT_SMTP_PORT: String(mail.smtpPort),
        NUXT_STRIPE_API_PORT: String(payments.port),
        NUXT_STRIPE_WEBHOOK_SECRET: secret,
        NUXT_SITE_URL: base,
      },
    })
    const deadline = Date.now() + 60_000
    while (Date.now() < deadline) {
      const healthy = await fetch(`${base}/api/health`).then(r => r.ok, () => false)
      if (healthy) return
      await new Promise(done => setTimeout(done, 100))
    }
    throw new Error('the server did not come back')
  }

  function kill() {
    server?.kill('SIGKILL')
    return new Promise(done => server!.once('exit', done))
  }

  /** Everything the API said it created is there, whole (items, totals, payment events), and the stock adds up. */
  async function expectConsistent(shop: Shop, answered: Set<string>, initialStock: number, when: string) {
    const orders: { number: string, status: string }[] = []
    for (let page = 1; ; page++) {
      const list = await shop.call(`/api/workshop/orders?pageSize=200&page=${page}`)
      if (list.status === 401) {
        await shop.call('/api/auth/login', { email: maker.email, password: maker.password })
        page--
        continue
      }
      expect(list.status).toBe(200)
      orders.push(...list.body.rows)
      if (list.body.rows.length < 200) break
    }
    const numbers = new Set(orders.map(order => order.number))
    for (const number of answered) expect(numbers.has(number), `order ${number} answered as created is missing (${when})`).toBe(true)
    let held = 0
    for (const order of orders) {
      const detail = await shop.call(`/api/workshop/orders/${order.number}`)
      expect(detail.body.items.length, `order ${order.number} has no items`).toBeGreaterThan(0)
      expect(detail.body.totalMinor).toBe(detail.body.subtotalMinor + detail.body.shippingMinor + detail.body.taxMinor)
      // The demo seed's own orders are not this test's business.
      const ours = detail.body.items.filter((item: any) => item.title === 'Crash test blank')
      if (ours.length === 0) continue
      if (detail.body.status === 'paid') expect(detail.body.paymentEvents.map((e: any) => e.type), `paid order ${order.number} without its payment event`).toContain('checkout.session.completed')
      if (detail.body.status !== 'cancelled') held += ours.reduce((sum: number, item: any) => sum + item.quantity, 0)
    }
    const stock = (await shop.call('/api/shop/products/crash-test-blank')).body.stock as number
    expect(stock + held, `stock does not add up (${when})`).toBe(initialStock)
    return orders.length
  }

  afterAll(async () => {
    server?.kill('SIGKILL')
    await payments.close()
    await mail.close()
    rmSync(dataDir, { recursive: true, force: true })
  })

  it('survives SIGKILL in the middle of checkouts and payments, 10 times in a row', { timeout: 240_000 }, async () => {
    await start()
    const shop = new Shop(base)
    expect((await shop.call('/api/auth/login', { email: maker.email, password: maker.password })).status).toBe(200)
    const product = await shop.call('/api/workshop/products', { slug: 'crash-test-blank', title: 'Crash test blank', kind: 'blank', format: 'two_minute', material: 'hard wax', priceMinor: 1200, stock: initialStock })
    expect(product.status).toBe(201)
    const startedAt = Date.now()
    let rounds = 0

    // Bounded in time (the test's own timeout is 240 s), and all ten rounds must have run.
    for (let round = 1; round <= 10 && Date.now() - startedAt < 200_000; round++) {
      rounds = round
      let answeredThisRound = 0
      const burst = Array.from({ length: 24 }, async (_, index) => {
        await new Promise(done => setTimeout(done, index * 15))
        const buyer = new Shop(base)
        const created = await buyer.call('/api/checkout', {
          items: [{ slug: 'crash-test-blank', qty: 1 + (index % 3) }],
          email: `crash-${round}-${index}@collectors.test`,
          shippingAddress: { name: 'Crash Tester', line1: '1 Test Row', city: 'Lowmere', postalCode: 'LM1', region: 'OR', country: 'US' },
          zone: 'domestic',
        }).catch(() => null)
        if (created?.status !== 201) return
        answered.add(created.body.orderNumber)
        answeredThisRound++
        const session = String(created.body.url).split('/').pop()
        await fetch(`${payments.url}/_fake/sessions/${session}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' }).catch(() => undefined)
      })
      // Kill once a few orders are answered (so the rest are mid-flight), or after a few seconds on a slow machine.
      const killAfter = 2 + (round % 4)
      const deadline = Date.now() + 8000
      while (answeredThisRound < killAfter && Date.now() < deadline) await new Promise(done => setTimeout(done, 10))
      await kill()
      await Promise.allSettled(burst)
      await start()

      await expectConsistent(shop, answered, initialStock, `round ${round}`)
    }
    expect(rounds, 'kill-and-restart rounds completed within the time bound').toBe(10)
    expect(answered.size).toBeGreaterThan(0)
  })

  it('a backup taken during a burst of writes restores to a consistent shop that starts and serves its orders', { timeout: 120_000 }, async () => {
    const shop = new Shop(base)
    await shop.call('/api/auth/login', { email: maker.email, password: maker.password })
    const before = new Set(answered)
    const burst = Array.from({ length: 20 }, async (_, index) => {
      const created = await new Shop(base).call('/api/checkout', {
        items: [{ slug: 'crash-test-blank', qty: 1 }],
        email: `backup-${index}@collectors.test`,
        shippingAddress: { name: 'Backup Tester', line1: '2 Test Row', city: 'Lowmere', postalCode: 'LM1', region: 'OR', country: 'US' },
        zone: 'domestic',
      })
      if (created.status !== 201) return
      answered.add(created.body.orderNumber)
      const session = String(created.body.url).split('/').pop()
      await fetch(`${payments.url}/_fake/sessions/${session}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })
    })
    await new Promise(done => setTimeout(done, 100))
    const backup = spawn(process.execPath, [resolve(rootDir, 'scripts/backup.mjs')], { cwd: rootDir, env: { ...process.env, PORT: String(port) }, stdio: 'pipe' })
    let said = ''
    backup.stdout!.on('data', (chunk) => {
      said += chunk
    })
    backup.stderr!.on('data', (chunk) => {
      said += chunk
    })
    expect(await new Promise(done => backup.once('exit', done)), said).toBe(0)
    await Promise.allSettled(burst)
    const file = /Backup written: (\S+)/.exec(said)?.[1]
    expect(file, said).toBeTruthy()

    // While the shop has its database open, restore refuses, even asked about another port.
    const refused = spawnSync(process.execPath, [resolve(rootDir, 'scripts/restore.mjs'), file!, '--yes'], { cwd: rootDir, env: { ...process.env, PORT: String(await freePort()), NUXT_DB_DIR: dataDir }, encoding: 'utf8' })
    expect(refused.status, refused.stdout + refused.stderr).toBe(1)
    expect(refused.stderr).toMatch(/The shop is running \(process \d+\)/)

    await kill()
    const restoredDb = join(dataDir, 'restored-db')
    const restoredUploads = join(dataDir, 'restored-uploads')
    const restore = spawn(process.execPath, [resolve(rootDir, 'scripts/restore.mjs'), file!, '--yes'], { cwd: rootDir, env: { ...process.env, PORT: String(port), NUXT_DB_DIR: restoredDb, NUXT_UPLOADS_DIR: restoredUploads }, stdio: 'pipe' })
    let restoreSaid = ''
    restore.stdout!.on('data', (chunk) => {
      restoreSaid += chunk
    })
    restore.stderr!.on('data', (chunk) => {
      restoreSaid += chunk
    })
    expect(await new Promise(done => restore.once('exit', done)), restoreSaid).toBe(0)
    expect(restoreSaid).toMatch(/Restored .* orders/)

    await start(restoredDb, restoredUploads)
    const restoredShop = new Shop(base)
    await restoredShop.call('/api/auth/login', { email: maker.email, password: maker.password })
    // Orders from before the backup are all there; those of the burst may or may not be, but whole.
    const count = await expectConsistent(restoredShop, before, initialStock, 'after restore')
    expect(count).toBeGreaterThanOrEqual(before.size)
  })

  it('on SIGTERM finishes the checkouts it took in, exits cleanly, and a retry with the same key loses nothing', { timeout: 120_000 }, async () => {
    const shop = new Shop(base)
    await shop.call('/api/auth/login', { email: maker.email, password: maker.password })
    const buyers = 30
    const outcome = new Map<number, number | 'no answer'>()
    const order = (index: number) => ({
      items: [{ slug: 'crash-test-blank', qty: 1 }],
      email: `sigterm-${index}@collectors.test`,
      shippingAddress: { name: 'Shutdown Tester', line1: '3 Test Row', city: 'Lowmere', postalCode: 'LM1', region: 'OR', country: 'US' },
      zone: 'domestic',
      checkoutKey: `sigterm-test-key-${String(index).padStart(4, '0')}`,
    })
    let created = 0
    const ours = new Set<string>()
    const burst = Array.from({ length: buyers }, async (_, index) => {
      await new Promise(done => setTimeout(done, index * 20))
      const answer = await new Shop(base).call('/api/checkout', order(index)).catch(() => null)
      outcome.set(index, answer?.status ?? 'no answer')
      if (answer?.status === 201) {
        created++
        ours.add(answer.body.orderNumber)
      }
    })
    const deadline = Date.now() + 8000
    while (created < 5 && Date.now() < deadline) await new Promise(done => setTimeout(done, 10))
    const exited = new Promise<number | null>(done => server!.once('exit', code => done(code)))
    server!.kill('SIGTERM')
    await Promise.allSettled(burst)
    // Nitro stops taking connections, lets the requests in flight finish, then closes the database.
    expect(await exited).toBe(0)
    const statuses = [...outcome.values()]
    expect(statuses.filter(status => typeof status === 'number' && status >= 500), JSON.stringify(statuses)).toEqual([])
    expect(statuses.filter(status => status === 201).length).toBeGreaterThanOrEqual(5)

    await start(join(dataDir, 'restored-db'), join(dataDir, 'restored-uploads'))
    // The customers whose press got no answer press again (the browser keeps the key): one order each.
    const again = await Promise.all(Array.from({ length: buyers }, (_, index) => new Shop(base).call('/api/checkout', order(index))))
    expect(again.map(answer => answer.status).filter(status => status !== 200 && status !== 201)).toEqual([])
    const numbers = new Set(again.map(answer => answer.body.orderNumber as string))
    expect(numbers.size).toBe(buyers)
    for (const number of ours) expect(numbers.has(number), `order ${number} answered before the shutdown is not the one the retry found`).toBe(true)
    await expectConsistent(shop, numbers, initialStock, 'after SIGTERM')
  })
})
