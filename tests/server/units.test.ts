import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

await useTestServer()

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client

beforeAll(async () => {
  maker = await signedIn(account('maker').email, account('maker').password)
})

describe('the shop\'s units: GET /api/shop/units, PUT /api/workshop/settings/units', () => {
  it('gives the defaults to anyone, takes a change from the maker only, and refuses a bad unit naming the field', async () => {
    const anyone = new Client()
    const before = await anyone.get('/api/shop/units')
    expect(before.status).toBe(200)
    expect(before.body).toEqual({ temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' })

    const shipper = await signedIn(account('shipper').email, account('shipper').password)
    expect((await shipper.put('/api/workshop/settings/units', { temperature: 'F' })).status).toBe(403)
    expect((await anyone.put('/api/workshop/settings/units', { temperature: 'F' })).status).toBe(401)

    for (const [body, field] of [[{ temperature: 'K' }, 'temperature'], [{ length: 'cubit' }, 'length'], [{ locale: 'xx-YY' }, 'locale'], [{ speed: 'rpm' }, 'speed']] as const) {
      const refused = await maker.put('/api/workshop/settings/units', body)
      expect(refused.status, JSON.stringify(refused.body)).toBe(400)
      expect(JSON.stringify(refused.body.data)).toContain(field)
    }
    expect((await anyone.get('/api/shop/units')).body).toEqual(before.body)

    try {
      const changed = await maker.put('/api/workshop/settings/units', { temperature: 'C', length: 'mm', weight: 'kg', locale: 'en-GB' })
      expect(changed.status).toBe(200)
      expect((await anyone.get('/api/shop/units')).body).toEqual({ temperature: 'C', length: 'mm', weight: 'kg', locale: 'en-GB' })
    }
    finally {
      expect((await maker.put('/api/workshop/settings/units', before.body)).status).toBe(200)
    }
  })
})
