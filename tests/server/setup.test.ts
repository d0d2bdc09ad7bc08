// A shop started without demo data has no maker; /setup with the code from the server's log makes one.
import { describe, expect, it } from 'vitest'
import { Client, useTestServer } from './harness'

const code = 'setup-code-for-the-test-0123456789'
await useTestServer({ NUXT_SEED_DEMO: 'false', NUXT_SETUP_TOKEN: code })

const maker = (tag: string) => ({ name: `Maker ${tag}`, email: `maker-${tag}@workshop.test`, password: 'a-long-enough-password' })

describe('first maker of an empty shop', () => {
  it('starts with nobody, and registration makes collectors only', async () => {
    expect((await new Client().get('/api/setup')).body).toEqual({ needed: true })
    const collector = new Client()
    expect((await collector.post('/api/auth/register', maker('collector'))).body.role).toBe('collector')
    expect((await collector.get('/api/workshop/users')).status).toBe(403)
    expect((await new Client().get('/api/setup')).body).toEqual({ needed: true })
  })

  it('refuses a wrong code and bad fields by name, and makes nothing', async () => {
    const wrong = await new Client().post('/api/setup', { ...maker('wrong'), code: 'not-the-code' })
    expect(wrong.status).toBe(400)
    expect(wrong.body.data.fields.code).toMatch(/not the setup code/)
    const badEmail = await new Client().post('/api/setup', { ...maker('bad'), email: 'no-at-sign', code })
    expect(badEmail.status).toBe(400)
    expect(Object.keys(badEmail.body.data.fields)).toEqual(['email'])
    const taken = await new Client().post('/api/setup', { ...maker('collector'), code })
    expect(taken.status).toBe(409)
    expect(taken.body.data.fields.email).toMatch(/already exists/)
    expect((await new Client().get('/api/setup')).body).toEqual({ needed: true })
  })

  it('makes exactly one maker when two people submit at once, signs them in, and then closes for good', async () => {
    const first = new Client()
    const second = new Client()
    const answers = await Promise.all([first.post('/api/setup', { ...maker('one'), code }), second.post('/api/setup', { ...maker('two'), code })])
    expect(answers.map(a => a.status).sort()).toEqual([201, 409])
    const winner = answers[0]!.status === 201 ? first : second
    expect((await winner.get('/api/auth/me')).body.role).toBe('maker')
    expect((await winner.get('/api/workshop/users')).status).toBe(200)
    expect((await new Client().get('/api/setup')).body).toEqual({ needed: false })
    expect((await new Client().post('/api/setup', { ...maker('late'), code })).status).toBe(409)
  })
})
