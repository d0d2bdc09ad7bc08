import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import type { Client } from './harness'
import { signedIn, useTestServer } from './harness'

// Casting records on a wax batch: the pour as the trade keeps it. The bounds (40–180 °C for the pot and
// the pour, 0–150 °C for the mould) only catch typing slips: common practice, no source.
await useTestServer()
const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let counter = 0
const newCode = () => `CAST-${Date.now() % 100000}-${++counter}`
const base = () => ({ code: newCode(), formula: 'stearic acid 75 / paraffin 25', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075 })

beforeAll(async () => {
  maker = await signedIn(account('maker').email, account('maker').password)
})

describe('casting records on wax batches', () => {
  it('round-trip: what was recorded at the pour comes back in the list, and a correction changes only what is sent', async () => {
    const casting = { meltTempC: 96.5, pourTempC: 88, mouldTempC: 45, coolingMinutes: 40, castCount: 24, rejectedAtCasting: 2 }
    const created = await maker.post('/api/workshop/batches', { ...base(), ...casting })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject(casting)
    const listed = (await maker.get('/api/workshop/batches')).body.find((batch: any) => batch.id === created.body.id)
    expect(listed).toMatchObject(casting)

    // Typed into a form, numbers arrive as text; an empty one is "not recorded".
    const patched = await maker.request(`/api/workshop/batches/${created.body.id}`, { method: 'PATCH', body: { pourTempC: '90', mouldTempC: null } })
    expect(patched.status, JSON.stringify(patched.body)).toBe(200)
    expect(patched.body).toMatchObject({ ...casting, pourTempC: 90, mouldTempC: null })

    // Left out at creation: nothing recorded.
    const bare = await maker.post('/api/workshop/batches', base())
    expect(bare.status).toBe(201)
    expect(bare.body).toMatchObject({ meltTempC: null, pourTempC: null, castCount: null, rejectedAtCasting: null })
  })

  it('refuses nonsense with a 400 naming the field, and stores nothing', async () => {
    const cases: [Record<string, unknown>, string][] = [
      [{ pourTempC: 900 }, 'pourTempC'],
      [{ meltTempC: -5 }, 'meltTempC'],
      [{ mouldTempC: 'warm' }, 'mouldTempC'],
      [{ coolingMinutes: 12.5 }, 'coolingMinutes'],
      [{ castCount: -1 }, 'castCount'],
      [{ castCount: 10, rejectedAtCasting: 11 }, 'rejectedAtCasting'],
    ]
    for (const [casting, field] of cases) {
      const body = { ...base(), ...casting }
      const refused = await maker.post('/api/workshop/batches', body)
      expect(refused.status, field).toBe(400)
      expect(Object.keys(refused.body.data.fields), field).toContain(field)
      const stored = (await maker.get('/api/workshop/batches')).body.some((batch: any) => batch.code === body.code)
      expect(stored, field).toBe(false)
    }
    const created = await maker.post('/api/workshop/batches', base())
    const patched = await maker.request(`/api/workshop/batches/${created.body.id}`, { method: 'PATCH', body: { pourTempC: 900 } })
    expect(patched.status).toBe(400)
    expect(patched.body.message).toMatch(/pourTempC/)
    expect((await maker.get('/api/workshop/batches')).body.find((batch: any) => batch.id === created.body.id).pourTempC).toBeNull()

    // A correction of one count is checked against the other as stored.
    const counted = await maker.post('/api/workshop/batches', { ...base(), castCount: 10, rejectedAtCasting: 3 })
    const tooMany = await maker.request(`/api/workshop/batches/${counted.body.id}`, { method: 'PATCH', body: { rejectedAtCasting: 12 } })
    expect(tooMany.status).toBe(400)
    expect(Object.keys(tooMany.body.data.fields)).toContain('rejectedAtCasting')
    const tooFew = await maker.request(`/api/workshop/batches/${counted.body.id}`, { method: 'PATCH', body: { castCount: 2 } })
    expect(tooFew.status).toBe(400)
    expect(Object.keys(tooFew.body.data.fields)).toContain('castCount')
    expect((await maker.get('/api/workshop/batches')).body.find((batch: any) => batch.id === counted.body.id)).toMatchObject({ castCount: 10, rejectedAtCasting: 3 })
  })

  it('only a maker records a pour', async () => {
    const collector = await signedIn(account('collector').email, account('collector').password)
    expect((await collector.post('/api/workshop/batches', { ...base(), pourTempC: 90 })).status).toBe(403)
  })
})
