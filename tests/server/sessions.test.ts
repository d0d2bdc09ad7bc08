import { describe, expect, it } from 'vitest'
import { Client, signedIn, useTestServer, waitFor } from './harness'

const mail = await useTestServer()
let counter = 0
const freshEmail = (tag: string) => `${tag}-${Date.now()}-${++counter}@sessions.test`

async function register(tag: string, password = 'a-long-enough-password') {
  const client = new Client()
  const email = freshEmail(tag)
  const answer = await client.post('/api/auth/register', { email, name: `Collector ${tag}`, password })
  expect(answer.status).toBe(201)
  return { client, email, password }
}

/** A second browser holding a copy of this one's cookies, as someone replaying a stolen or stale cookie would. */
function copyOf(client: Client): Client {
  const copy = new Client()
  copy.cookies = new Map(client.cookies)
  return copy
}

const sessionCookie = (headers: Headers) => headers.getSetCookie().find(line => line.startsWith('nuxt-session='))

async function statuses(client: Client) {
  return [(await client.get('/api/auth/me')).status, (await client.get('/api/account/orders')).status]
}

describe('sessions end on the server', () => {
  it('signing out ends that session only: its replayed cookie is refused, the other device stays signed in', async () => {
    const { client: laptop, email, password } = await register('signout')
    const phone = await signedIn(email, password)
    const replay = copyOf(laptop)
    expect(await statuses(replay)).toEqual([200, 200])

    const out = await laptop.post('/api/auth/logout')
    expect(out.status).toBe(200)
    expect(sessionCookie(out.headers)).toMatch(/Max-Age=0/i)
    expect(await statuses(laptop)).toEqual([401, 401])
    expect(await statuses(replay)).toEqual([401, 401])
    expect(await statuses(phone)).toEqual([200, 200])
  })

  it('the sign-in module\'s own cookie clearing (DELETE /api/_auth/session) ends the session too', async () => {
    const { client } = await register('module-clear')
    const replay = copyOf(client)
    expect((await client.request('/api/_auth/session', { method: 'DELETE' })).status).toBe(200)
    expect(await statuses(replay)).toEqual([401, 401])
  })

  it('sign out everywhere ends every session of the account, this one included', async () => {
    const { client: laptop, email, password } = await register('everywhere')
    const phone = await signedIn(email, password)
    const replay = copyOf(laptop)
    const other = await register('bystander')

    expect((await new Client().post('/api/auth/logout-all')).status).toBe(401)
    expect((await laptop.post('/api/auth/logout-all')).status).toBe(200)
    for (const client of [laptop, phone, replay]) expect(await statuses(client)).toEqual([401, 401])
    // Another account's session is not touched.
    expect(await statuses(other.client)).toEqual([200, 200])
    expect(await statuses(await signedIn(email, password))).toEqual([200, 200])
  })

  it('the session cookie lives 30 days, http-only', async () => {
    const { email, password } = await register('lifetime')
    const answer = await new Client().post('/api/auth/login', { email, password })
    const cookie = sessionCookie(answer.headers)!
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    const maxAge = Number(/Max-Age=(\d+)/i.exec(cookie)?.[1])
    expect(maxAge).toBe(30 * 24 * 60 * 60)
  })

  it('signing in again on a browser ends the session it held before', async () => {
    const { client, email, password } = await register('again')
    const before = copyOf(client)
    expect((await client.post('/api/auth/login', { email, password })).status).toBe(200)
    expect(await statuses(client)).toEqual([200, 200])
    expect(await statuses(before)).toEqual([401, 401])
  })

  it('a password change keeps this device signed in on a new session and ends every other one', async () => {
    const { client, email, password } = await register('change')
    const other = await signedIn(email, password)
    const before = copyOf(client)
    expect((await client.post('/api/auth/password', { currentPassword: password, newPassword: 'a-fresh-password-1' })).status).toBe(200)
    expect(await statuses(client)).toEqual([200, 200])
    expect(await statuses(other)).toEqual([401, 401])
    expect(await statuses(before)).toEqual([401, 401])
  })
})

describe('reset links: only the newest, and none from before a password change', () => {
  const links = async (email: string, count: number) => {
    const messages = await waitFor(async () => {
      const found = mail.fake.list().filter(m => m.to.includes(email) && /Reset/.test(m.subject))
      return found.length >= count ? found : undefined
    }, 15_000, `${count} reset mails`)
    return messages.map(message => /token=([\w-]+)/.exec(message.text)![1]!)
  }
  const requestLink = async (email: string) => expect((await new Client().post('/api/auth/reset-request', { email })).status).toBe(200)
  const useLink = (token: string, password: string) => new Client().post('/api/auth/reset', { token, password })

  it('an older link is refused once a newer one was issued, and after the newer one was used', async () => {
    const { client, email } = await register('reset-newer')
    await requestLink(email)
    const [older] = await links(email, 1)
    await requestLink(email)
    const newer = (await links(email, 2)).find(token => token !== older)!

    const refused = await useLink(older!, 'password-from-the-older-link')
    expect(refused.status).toBe(400)
    expect(refused.body.data.fields.token).toMatch(/replaced by a newer one/)

    const used = await useLink(newer, 'password-from-the-newer-link')
    expect(used.status).toBe(200)
    expect((await useLink(older!, 'password-from-the-older-link')).status).toBe(400)
    // The reset signed out the device that was signed in with the old password.
    expect(await statuses(client)).toEqual([401, 401])
    expect((await new Client().post('/api/auth/login', { email, password: 'password-from-the-newer-link' })).status).toBe(200)
    expect((await new Client().post('/api/auth/login', { email, password: 'password-from-the-older-link' })).status).toBe(401)
  })

  it('a link asked for before a password change is refused after it', async () => {
    const { client, email, password } = await register('reset-change')
    await requestLink(email)
    const [token] = await links(email, 1)
    expect((await client.post('/api/auth/password', { currentPassword: password, newPassword: 'the-changed-password' })).status).toBe(200)
    expect((await useLink(token!, 'password-from-the-old-link')).status).toBe(400)
    expect((await new Client().post('/api/auth/login', { email, password: 'the-changed-password' })).status).toBe(200)
  })
})

describe('sign-in limits count failures only', () => {
  it('10 sign-ins at once with the right password all succeed, each with a session of its own', async () => {
    const { email, password } = await register('parallel-right')
    const clients = Array.from({ length: 10 }, () => new Client())
    const answers = await Promise.all(clients.map(client => client.post('/api/auth/login', { email, password })))
    expect(answers.map(a => a.status)).toEqual(Array(10).fill(200))
    for (const client of clients) expect((await client.get('/api/auth/me')).status).toBe(200)
    // Their successes left nothing counted against the account: five wrong tries are still each checked.
    for (let attempt = 1; attempt <= 5; attempt++) {
      expect((await new Client().post('/api/auth/login', { email, password: `wrong-${attempt}` })).status).toBe(401)
    }
  })

  it('20 wrong guesses at once: at most 5 are checked, the rest are 429, and the pause holds for the right password', async () => {
    const { email, password } = await register('parallel-wrong')
    const answers = await Promise.all(Array.from({ length: 20 }, (_, i) => new Client().post('/api/auth/login', { email, password: `guess-${i}` })))
    const codes = answers.map(a => a.status)
    expect(codes.filter(s => s === 401).length).toBeLessThanOrEqual(5)
    expect(codes.filter(s => s === 429).length).toBeGreaterThanOrEqual(15)
    expect(codes.filter(s => s !== 401 && s !== 429)).toEqual([])
    const checked = codes.filter(s => s === 401).length
    for (let left = 5 - checked; left > 0; left--) {
      expect((await new Client().post('/api/auth/login', { email, password: `again-${left}` })).status).toBe(401)
    }
    const paused = await new Client().post('/api/auth/login', { email, password })
    expect(paused.status).toBe(429)
    expect(paused.body.message).toMatch(/paused for about/)
  })
})
