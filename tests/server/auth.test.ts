import { describe, expect, it } from 'vitest'
import { startMailFake } from '../../fakes/mail/server'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer, waitFor } from './harness'

const mail = await useTestServer({ NUXT_RESET_TTL_SECONDS: '3' })
const maker = demoAccounts.find(a => a.role === 'maker')!
const shipper = demoAccounts.find(a => a.role === 'shipper')!
let counter = 0
const freshEmail = (tag: string) => `${tag}-${Date.now()}-${++counter}@collectors.test`

async function register(tag: string, password = 'a-long-enough-password') {
  const client = new Client()
  const email = freshEmail(tag)
  const answer = await client.post('/api/auth/register', { email, name: `Collector ${tag}`, password })
  expect(answer.status).toBe(201)
  return { client, email, password, id: answer.body.id as number }
}

describe('registration and sign-in', () => {
  it('registers, signs in, and /api/auth/me answers the user', async () => {
    const { email, password } = await register('basic')
    const client = new Client()
    const login = await client.post('/api/auth/login', { email: email.toUpperCase(), password })
    expect(login.status).toBe(200)
    const me = await client.get('/api/auth/me')
    expect(me.status).toBe(200)
    expect(me.body).toMatchObject({ email, role: 'collector', name: 'Collector basic' })
    expect(Object.keys(me.body).sort()).toEqual(['email', 'id', 'name', 'role'])
  })

  it('refuses a second account on the same e-mail in another case', async () => {
    const { email } = await register('twice')
    const answer = await new Client().post('/api/auth/register', { email: email.toUpperCase(), name: 'Other', password: 'another-long-password' })
    expect(answer.status).toBe(409)
    expect(answer.body.data.fields.email).toMatch(/already exists/)
  })

  it('answers a wrong password with 401 and a message', async () => {
    const { email } = await register('wrong')
    const answer = await new Client().post('/api/auth/login', { email, password: 'not-the-password' })
    expect(answer.status).toBe(401)
    expect(answer.body.message).toMatch(/e-mail or the password/)
  })

  it('throttles the 6th wrong try with 429 and says for how long', async () => {
    const { email, password } = await register('throttle')
    const client = new Client()
    for (let attempt = 1; attempt <= 5; attempt++) {
      expect((await client.post('/api/auth/login', { email, password: `wrong-${attempt}` })).status).toBe(401)
    }
    const sixth = await client.post('/api/auth/login', { email, password: 'wrong-6' })
    expect(sixth.status).toBe(429)
    expect(sixth.body.message).toMatch(/paused for about 1[45] minutes/)
    expect(Number(sixth.headers.get('retry-after'))).toBeGreaterThan(0)
    // Even the right password waits out the pause.
    expect((await client.post('/api/auth/login', { email, password })).status).toBe(429)
  })

  it('lets at most 5 of 12 parallel wrong guesses be checked; the rest are 429 (common practice, no source)', async () => {
    const { email, password } = await register('parallel')
    const answers = await Promise.all(Array.from({ length: 12 }, (_, i) => new Client().post('/api/auth/login', { email, password: `guess-${i}` })))
    const statuses = answers.map(a => a.status)
    // 0 to 5 are checked (if all 12 are logged before any recount, all are refused: still within the limit).
    const checked = statuses.filter(s => s === 401).length
    expect(checked).toBeLessThanOrEqual(5)
    expect(statuses.filter(s => s !== 401 && s !== 429)).toEqual([])
    // Refused guesses were never checked, so they do not count: the account has 5 − checked tries left.
    for (let left = 5 - checked; left > 0; left--) {
      expect((await new Client().post('/api/auth/login', { email, password: `again-${left}` })).status).toBe(401)
    }
    expect((await new Client().post('/api/auth/login', { email, password: 'one-too-many' })).status).toBe(429)
    expect((await new Client().post('/api/auth/login', { email, password })).status).toBe(429)
  })

  it('signs out', async () => {
    const { client } = await register('signout')
    expect((await client.get('/api/auth/me')).status).toBe(200)
    expect((await client.post('/api/auth/logout')).status).toBe(200)
    expect((await client.get('/api/auth/me')).status).toBe(401)
  })

  it('refuses passwords that are short, too long or among the commonest', async () => {
    for (const [password, pattern] of [['short', /at least 8/], ['x'.repeat(129), /at most 128/], ['password123', /commonest/]] as const) {
      const answer = await new Client().post('/api/auth/register', { email: freshEmail('weak'), name: 'Weak', password })
      expect(answer.status).toBe(400)
      expect(answer.body.data.fields.password).toMatch(pattern)
    }
  })
})

describe('backups', () => {
  it('the backup download is the maker\'s alone, and the backup command\'s route needs its key', async () => {
    expect((await new Client().get('/api/workshop/backup')).status).toBe(401)
    const { client } = await register('backup')
    expect((await client.get('/api/workshop/backup')).status).toBe(403)
    for (const headers of [{}, { 'x-backup-token': 'not-the-key' }]) {
      const answer = await client.request('/api/backup', { method: 'POST', body: {}, headers })
      expect(answer.status).toBe(403)
      expect(answer.body.message).toMatch(/x-backup-token/)
    }
    const download = await (await signedIn(maker.email, maker.password)).request('/api/workshop/backup')
    if (process.env.TEST_DATABASE_URL) {
      // On a PostgreSQL server the shop is backed up with pg_dump; the route says so.
      expect(download.status).toBe(409)
    }
    else {
      expect(download.status).toBe(200)
      expect(download.headers.get('content-type')).toBe('application/gzip')
      expect(download.headers.get('content-disposition')).toMatch(/^attachment; filename="?groovewright-[\w.-]*\.tar\.gz"?$/)
    }
  })
})

describe('roles', () => {
  it('collector on a maker route → 403, anonymous → 401', async () => {
    const { client } = await register('role')
    expect((await client.get('/api/workshop/users')).status).toBe(403)
    expect((await new Client().get('/api/workshop/users')).status).toBe(401)
    const makerClient = await signedIn(maker.email, maker.password)
    expect((await makerClient.get('/api/workshop/users')).status).toBe(200)
  })

  it('after a maker changes a role, that user\'s next request sees it', async () => {
    const person = await register('promote')
    expect((await person.client.get('/api/workshop/users')).status).toBe(403)
    const makerClient = await signedIn(maker.email, maker.password)
    const change = await makerClient.request(`/api/workshop/users/${person.id}`, { method: 'PATCH', body: { role: 'shipper' } })
    expect(change.status).toBe(200)
    expect((await person.client.get('/api/auth/me')).body.role).toBe('shipper')
    const promote = await makerClient.request(`/api/workshop/users/${person.id}`, { method: 'PATCH', body: { role: 'maker' } })
    expect(promote.status).toBe(200)
    expect((await person.client.get('/api/workshop/users')).status).toBe(200)
    // Back to collector: the very next request loses the workshop.
    await makerClient.request(`/api/workshop/users/${person.id}`, { method: 'PATCH', body: { role: 'collector' } })
    expect((await person.client.get('/api/workshop/users')).status).toBe(403)
  })

  it('keeps at least one maker', async () => {
    const makerClient = await signedIn(maker.email, maker.password)
    const users = (await makerClient.get('/api/workshop/users')).body as { id: number, role: string }[]
    const makers = users.filter(u => u.role === 'maker')
    expect(makers).toHaveLength(1)
    const answer = await makerClient.request(`/api/workshop/users/${makers[0]!.id}`, { method: 'PATCH', body: { role: 'collector' } })
    expect(answer.status).toBe(409)
    expect(answer.body.message).toMatch(/at least one maker/)
  })

  it('a shipper may not manage people', async () => {
    const shipperClient = await signedIn(shipper.email, shipper.password)
    expect((await shipperClient.get('/api/workshop/users')).status).toBe(403)
  })
})

describe('request safety', () => {
  it('a POST without a same-site Origin → 403 and changes nothing', async () => {
    const email = freshEmail('csrf')
    const missing = await new Client().post('/api/auth/register', { email, name: 'X', password: 'long-enough-pass' }, { origin: null })
    expect(missing.status).toBe(403)
    const foreign = await new Client().post('/api/auth/register', { email, name: 'X', password: 'long-enough-pass' }, { origin: 'http://evil.example.com' })
    expect(foreign.status).toBe(403)
    expect((await new Client().post('/api/auth/login', { email, password: 'long-enough-pass' })).status).toBe(401)
  })

  it('nothing changes state on GET', async () => {
    const email = freshEmail('get')
    const answer = await new Client().get(`/api/auth/register?email=${email}&name=X&password=long-enough-pass`)
    expect([404, 405]).toContain(answer.status)
    expect((await new Client().post('/api/auth/login', { email, password: 'long-enough-pass' })).status).toBe(401)
    const { client } = await register('get-logout')
    expect([404, 405]).toContain((await client.get('/api/auth/logout')).status)
    expect((await client.get('/api/auth/me')).status).toBe(200)
  })

  it('bad bodies → 400 naming the field, never 500', async () => {
    const client = new Client()
    const missing = await client.post('/api/auth/register', { email: freshEmail('bad'), password: 'long-enough-pass' })
    expect(missing.status).toBe(400)
    expect(missing.body.data.fields.name).toBe('name is required')
    const wrongType = await client.post('/api/auth/register', { email: 42, name: 'X', password: 'long-enough-pass' })
    expect(wrongType.status).toBe(400)
    expect(wrongType.body.data.fields.email).toBe('email must be text')
    const huge = await client.post('/api/auth/register', { email: freshEmail('huge'), name: 'x'.repeat(10 * 1024 * 1024), password: 'long-enough-pass' })
    expect(huge.status).toBe(400)
    expect(huge.body.data.fields.name).toMatch(/too long/)
    const notJson = await client.request('/api/auth/login', { method: 'POST', rawBody: '{"email": ' })
    expect(notJson.status).toBe(400)
    expect(notJson.body.message).toMatch(/body/)
    const array = await client.post('/api/auth/login', [1, 2])
    expect(array.status).toBe(400)
    const badId = await (await signedIn(maker.email, maker.password)).request('/api/workshop/users/abc', { method: 'PATCH', body: { role: 'maker' } })
    expect(badId.status).toBe(400)
    expect(badId.body.data.fields.id).toBeDefined()
  })
})

describe('passwords and mail', () => {
  const resetLink = async (email: string, after: number) => {
    const message = await waitFor(async () => mail.fake.list().filter(m => m.to.includes(email) && /Reset/.test(m.subject))[after], 15_000, 'the reset mail')
    const match = /token=([\w-]+)/.exec(message.text)
    expect(match).not.toBeNull()
    return match![1]!
  }

  it('a reset link works once, and not after expiry', async () => {
    const { email } = await register('reset')
    expect((await new Client().post('/api/auth/reset-request', { email })).status).toBe(200)
    const token = await resetLink(email, 0)
    const first = await new Client().post('/api/auth/reset', { token, password: 'a-brand-new-password' })
    expect(first.status).toBe(200)
    const again = await new Client().post('/api/auth/reset', { token, password: 'yet-another-password' })
    expect(again.status).toBe(400)
    expect(again.body.data.fields.token).toMatch(/expired, has been used or was replaced/)
    expect((await new Client().post('/api/auth/login', { email, password: 'a-brand-new-password' })).status).toBe(200)

    // The test server's links live 3 seconds (NUXT_RESET_TTL_SECONDS).
    await new Client().post('/api/auth/reset-request', { email })
    const late = await resetLink(email, 1)
    await new Promise(resolve => setTimeout(resolve, 3500))
    const expired = await new Client().post('/api/auth/reset', { token: late, password: 'too-late-password' })
    expect(expired.status).toBe(400)
    expect((await new Client().post('/api/auth/login', { email, password: 'too-late-password' })).status).toBe(401)
  })

  it('a password change ends the other sessions', async () => {
    const { client, email, password } = await register('change')
    const other = await signedIn(email, password)
    const wrong = await client.post('/api/auth/password', { currentPassword: 'not-it-at-all', newPassword: 'a-fresh-password-1' })
    expect(wrong.status).toBe(400)
    expect(wrong.body.data.fields.currentPassword).toBeDefined()
    const changed = await client.post('/api/auth/password', { currentPassword: password, newPassword: 'a-fresh-password-1' })
    expect(changed.status).toBe(200)
    expect((await client.get('/api/auth/me')).status).toBe(200)
    expect((await other.get('/api/auth/me')).status).toBe(401)
  })

  it('a reset request for an unknown address answers the same and sends nothing', async () => {
    const email = freshEmail('nobody')
    const answer = await new Client().post('/api/auth/reset-request', { email })
    expect(answer.status).toBe(200)
    await new Promise(resolve => setTimeout(resolve, 600))
    expect(mail.fake.list().filter(m => m.to.includes(email))).toHaveLength(0)
  })

  it('answers a 4th reset request for one address within the hour with 429, whether or not it has an account', async () => {
    for (const email of [freshEmail('nobody-often'), (await register('reset-often')).email]) {
      for (let request = 1; request <= 3; request++) {
        expect((await new Client().post('/api/auth/reset-request', { email })).status, `request ${request} for ${email}`).toBe(200)
      }
      const fourth = await new Client().post('/api/auth/reset-request', { email })
      expect(fourth.status).toBe(429)
      expect(fourth.body.message).toMatch(/Too many reset requests.*about (59|60) minutes/)
      expect(Number(fourth.headers.get('retry-after'))).toBeGreaterThan(0)
    }
  })

  it('lets at most 3 of 8 parallel reset requests for one address through (common practice, no source)', async () => {
    const email = freshEmail('reset-burst')
    const answers = await Promise.all(Array.from({ length: 8 }, () => new Client().post('/api/auth/reset-request', { email })))
    const statuses = answers.map(a => a.status)
    expect(statuses.filter(s => s === 200).length).toBeLessThanOrEqual(3)
    expect(statuses.filter(s => s !== 200 && s !== 429)).toEqual([])
    const through = statuses.filter(s => s === 200).length
    for (let left = 3 - through; left > 0; left--) expect((await new Client().post('/api/auth/reset-request', { email })).status).toBe(200)
    expect((await new Client().post('/api/auth/reset-request', { email })).status).toBe(429)
  })

  it('with the mail server down, registration succeeds and the welcome mail arrives once after it returns', async () => {
    const { smtpPort, httpPort } = mail.fake
    await mail.fake.close()
    const { email } = await register('outage')
    await new Promise(resolve => setTimeout(resolve, 1500))
    mail.fake = await startMailFake({ smtpPort, httpPort, dir: mail.dir, quiet: true })
    const welcome = await waitFor(async () => mail.fake.list().find(m => m.to.includes(email)), 20_000, 'the welcome mail')
    expect(welcome.subject).toBe('Welcome to Groovewright')
    expect(welcome.text).toMatch(/Groovewright demo workshop/)
    expect(welcome.html).toMatch(/<h1/)
    await new Promise(resolve => setTimeout(resolve, 2500))
    expect(mail.fake.list().filter(m => m.to.includes(email))).toHaveLength(1)
  })
})
