import { getServerLogs } from '@nuxt/test-utils/e2e'
import { describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer, waitFor } from './harness'

// The built server as an operator runs it: NODE_ENV=production writes one JSON object a line on stdout.
const mail = await useTestServer({ NODE_ENV: 'production', LOG_LEVEL: 'info' })

type Line = Record<string, unknown>
const jsonLines = (): Line[] => getServerLogs().flatMap((text) => {
  try {
    const parsed = JSON.parse(text) as unknown
    return parsed && typeof parsed === 'object' ? [parsed as Line] : []
  }
  catch {
    return []
  }
})

describe('operator log', () => {
  it('writes one JSON line per request, with status, time, user and the order number', async () => {
    const collector = demoAccounts.find(a => a.role === 'collector')!
    const client = await signedIn(collector.email, collector.password)
    const mine = await client.get<{ number: string }[]>('/api/account/orders')
    const number = mine.body[0]!.number
    const me = await client.get<{ id: number }>('/api/auth/me')
    expect((await client.get(`/api/orders/${number}`)).status).toBe(200)
    expect((await new Client().get(`/api/orders/${number}`)).status).toBe(404)

    const lines = await waitFor(async () => {
      const found = jsonLines().filter(line => line.msg === 'request' && line.path === `/api/orders/${number}`)
      return found.length >= 2 ? found : undefined
    }, 10_000, 'the request lines')
    expect(lines).toHaveLength(2)
    expect(lines[0]).toMatchObject({ level: 'info', method: 'GET', status: 200, order: number, user: me.body.id })
    expect(typeof lines[0]!.ms).toBe('number')
    expect(new Date(String(lines[0]!.time)).getTime()).not.toBeNaN()
    // A visitor's refused look: the status as sent, and no user.
    expect(lines[1]).toMatchObject({ status: 404, order: number })
    expect(lines[1]!.user).toBeUndefined()
  })

  it('writes one line per background job run that did something', async () => {
    expect(jsonLines().find(line => line.msg === 'job' && line.job === 'start-up')).toMatchObject({ level: 'info', database: expect.any(String) })
    const { email } = demoAccounts.find(a => a.role === 'collector')!
    expect((await new Client().post('/api/auth/reset-request', { email })).status).toBe(200)
    await waitFor(async () => mail.fake.list().some(m => m.to.includes(email)), 15_000, 'the reset mail')
    const run = await waitFor(async () => jsonLines().find(line => line.msg === 'job' && line.job === 'mail' && Number(line.sent) >= 1), 10_000, 'the mail job line')
    expect(run).toMatchObject({ level: 'info', failed: 0, requeued: 0 })
    expect(run.error).toBeUndefined()
    expect(typeof run.ms).toBe('number')
    // Idle passes of the mail loop (every 150 ms here) stay out of the log at level info.
    expect(jsonLines().filter(line => line.job === 'mail' && line.sent === 0 && line.failed === 0).length).toBe(0)
  })
})
