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

describe('figures typed in either unit give the same answers', () => {
  it('heat and fit: 95 °F and 35 °C sit the blank in the same place; a heat risk of 89.6 °F is the 32 °C hold', async () => {
    // 95 °F = 35 °C exactly (NIST SP 811 B.8: t/°C = (t/°F − 32)/1.8).
    const inF = await maker.get('/api/workshop/bench/heat-fit?temperature=95&unit=F&wax=stearic_acid')
    const inC = await maker.get('/api/workshop/bench/heat-fit?temperature=35&unit=C&wax=stearic_acid')
    expect(inF.status).toBe(200)
    expect(inC.body.boreGrowthIn).toBeCloseTo(inF.body.boreGrowthIn, 9)
    expect(inC.body.extraTravelIn).toBeCloseTo(inF.body.extraTravelIn, 9)
    const riskF = await maker.get('/api/workshop/bench/heat-risk?high=89.6&unit=F&days=1')
    const riskC = await maker.get('/api/workshop/bench/heat-risk?high=32&unit=C&days=1')
    expect(riskF.body.level).toBe(riskC.body.level)
    expect(riskF.body.forecastHighC).toBe(32)
  })

  it('a batch\'s pour typed in °F is stored in °C; the shop\'s figures take °F and pounds and keep °C and grams', async () => {
    // 302 °F = 150 °C, 192.2 °F = 89 °C (NIST SP 811 B.8).
    const batch = await maker.post('/api/workshop/batches', { code: `UNITS-${Date.now() % 100000}`, formula: 'stearic acid 80 / paraffin 20', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075, meltTempC: '302 °F', pourTempC: '192.2F', softeningPointC: '58 °C' })
    expect(batch.status, JSON.stringify(batch.body)).toBe(201)
    expect(batch.body).toMatchObject({ meltTempC: 150, pourTempC: 89, softeningPointC: 58 })
    const hot = await maker.post('/api/workshop/batches', { code: `UNITS-${Date.now() % 100000}-HOT`, formula: 'stearic acid', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075, pourTempC: '400 °F' })
    expect(hot.status).toBe(400)
    expect(hot.body.data.fields.pourTempC).toBe('pourTempC must be at most 180 °C (356 °F): check the figure and its unit')

    const figures = await maker.get('/api/workshop/settings/engine')
    const before = figures.body.settings
    try {
      // 80.6 °F = 27 °C; 1 lb = 453.59237 g (NIST SP 811 B.8).
      const changed = await maker.put('/api/workshop/settings/engine', { ...before, heat: { ...before.heat, cautionHighC: '80.6 °F', holdHighC: 32 }, packing: { ...before.packing, fillerWeightG: '1 lb' } })
      expect(changed.status, JSON.stringify(changed.body)).toBe(200)
      expect(changed.body.settings.heat.cautionHighC).toBe(27)
      expect(changed.body.settings.packing.fillerWeightG).toBeCloseTo(453.592, 3)
    }
    finally {
      expect((await maker.put('/api/workshop/settings/engine', before)).status).toBe(200)
    }
  })
})
