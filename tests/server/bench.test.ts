import { beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

await useTestServer()

const account = (role: string) => demoAccounts.find(a => a.role === role)!
const anonymous = new Client()
// The server starts in setup()'s own beforeAll, and seeds the demo accounts as it starts: the health
// route answers once that is done, so sign in only after it (wrong tries would be throttled).
let maker: Client
beforeAll(async () => {
  expect((await anonymous.get('/api/health')).status).toBe(200)
  maker = await signedIn(account('maker').email, account('maker').password)
})

/** Every bad input must be a 400 whose `data.fields` names the field, never a 500. */
function expectFieldError(answer: { status: number, body: any }, field: string) {
  expect(answer.status, JSON.stringify(answer.body)).toBe(400)
  expect(Object.keys(answer.body.data.fields)).toContain(field)
  expect(answer.body.message).toContain(field)
}

describe('GET /api/bench/playing-time (public)', () => {
  it('3.6 in at 100 per inch and 160 rpm on a 2.19 in blank (cylinder technical notes of university sound archives; arithmetic)', async () => {
    const answer = await anonymous.get('/api/bench/playing-time?length=3.6&tpi=100&rpm=160&diameter=2.19')
    expect(answer.status).toBe(200)
    expect(Object.keys(answer.body).sort()).toEqual(['groovePitchMm', 'minutes', 'rotationHz', 'seconds', 'surfaceSpeedInPerSec'])
    // 3.6 × 100 ÷ 160 = 2.25 min = 135 s: university sound archives' cylinder notes, arithmetic.
    expect(answer.body.minutes).toBeCloseTo(2.25, 4)
    expect(answer.body.seconds).toBeCloseTo(135, 2)
    // π × 2.19 × 160 ÷ 60 = 18.3 in/s: arithmetic on the 1890s user guide's 2.19 in.
    expect(answer.body.surfaceSpeedInPerSec).toBeCloseTo(18.3, 1)
    // 160 ÷ 60 = 2.67 Hz: arithmetic.
    expect(answer.body.rotationHz).toBeCloseTo(2.67, 2)
    // 25.4 mm ÷ 100 = 0.254 mm: 1 in = 25.4 mm exactly (NIST).
    expect(answer.body.groovePitchMm).toBeCloseTo(0.254, 4)
  })

  it('3.8 in at 200 per inch, typed as a fraction, defaults to the standard 160 rpm (archives\' notes; arithmetic; NIST)', async () => {
    const answer = await anonymous.get(`/api/bench/playing-time?length=${encodeURIComponent('3 4/5')}&tpi=200`)
    expect(answer.status).toBe(200)
    // 3.8 × 200 ÷ 160 = 4.75 min: university sound archives' cylinder notes, arithmetic.
    expect(answer.body.minutes).toBeCloseTo(4.75, 4)
    // 25.4 ÷ 200 = 0.127 mm: NIST.
    expect(answer.body.groovePitchMm).toBeCloseTo(0.127, 4)
  })

  it('takes millimetres: 91.44 mm is 3.6 in (NIST 1 in = 25.4 mm exactly)', async () => {
    const answer = await anonymous.get(`/api/bench/playing-time?length=${encodeURIComponent('91.44 mm')}&tpi=100&rpm=160`)
    expect(answer.body.minutes).toBeCloseTo(2.25, 4)
  })

  it('refuses letters, negatives, 7/0, a missing length and a number too long to read, naming each field', async () => {
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=long&tpi=100'), 'length')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=3.6&tpi=abc'), 'tpi')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=-3.6&tpi=100'), 'length')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=3.6&tpi=100&diameter=-2.19'), 'diameter')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=7/0&tpi=100'), 'length')
    expectFieldError(await anonymous.get('/api/bench/playing-time?tpi=100'), 'length')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=3.6'), 'tpi')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=3.6&tpi=100&rpm=0'), 'rpm')
    expectFieldError(await anonymous.get(`/api/bench/playing-time?length=${'9'.repeat(400)}&tpi=100`), 'length')
    expectFieldError(await anonymous.get('/api/bench/playing-time?length=1&length=2&tpi=100'), 'length')
  })
})

describe('POST /api/custom/fit (public)', () => {
  it('counts words as said and measures them against the format (speaking rate about 150 a minute: from memory)', async () => {
    const answer = await anonymous.post('/api/custom/fit', { script: 'Happy forty-second birthday, Ada! Love from 1905.', format: 'two_minute' })
    expect(answer.status).toBe(200)
    expect(Object.keys(answer.body).sort()).toEqual(['capacitySeconds', 'seconds', 'verdict', 'words', 'wordsLeft'])
    // happy forty second birthday ada love from nineteen oh five = 10 (hyphen parts count; 1905 said as a year).
    expect(answer.body.words).toBe(10)
    // 3.6 in × 100 ÷ 160 rpm = 2.25 min = 135 s (archives' notes; arithmetic).
    expect(answer.body.capacitySeconds).toBe(135)
    // Default settings: 4 s lead-in + 10 words at 150 a minute (4 s) + 4 s run-out = 12 s.
    expect(answer.body.seconds).toBeCloseTo(12, 1)
    expect(answer.body.verdict).toBe('fits')
    // (135 − 8) s × 150 ÷ 60 = 317.5 → 317 words in all, 307 left.
    expect(answer.body.wordsLeft).toBe(307)
  })

  it('a 4-minute record at 160 rpm holds 4.75 min (archives\' notes; arithmetic), and a slower speed holds more', async () => {
    const four = await anonymous.post('/api/custom/fit', { script: 'Hello.', format: 'four_minute' })
    expect(four.body.capacitySeconds).toBe(285)
    const slow = await anonymous.post('/api/custom/fit', { script: 'Hello.', format: 'two_minute', rpm: 120 })
    // 3.6 × 100 ÷ 120 = 3 min.
    expect(slow.body.capacitySeconds).toBe(180)
  })

  it('says too_long with the words over when the script will not fit', async () => {
    const answer = await anonymous.post('/api/custom/fit', { script: 'word '.repeat(400), format: 'two_minute' })
    expect(answer.body.verdict).toBe('too_long')
    expect(answer.body.wordsLeft).toBe(317 - 400)
  })

  it('refuses a 100 kB script, a missing script, an unknown format and letters for rpm, naming each field', async () => {
    expectFieldError(await anonymous.post('/api/custom/fit', { script: 'wax '.repeat(25_600), format: 'two_minute' }), 'script')
    // Just over the limit but a small body, so the schema rather than the size guard answers.
    expectFieldError(await anonymous.post('/api/custom/fit', { script: 'x'.repeat(20_001), format: 'two_minute' }), 'script')
    expectFieldError(await anonymous.post('/api/custom/fit', { format: 'two_minute' }), 'script')
    expectFieldError(await anonymous.post('/api/custom/fit', { script: 42, format: 'two_minute' }), 'script')
    expectFieldError(await anonymous.post('/api/custom/fit', { script: 'Hello', format: 'eight_minute' }), 'format')
    expectFieldError(await anonymous.post('/api/custom/fit', { script: 'Hello', format: 'two_minute', rpm: 'fast' }), 'rpm')
    expectFieldError(await anonymous.post('/api/custom/fit', { script: 'Hello', format: 'two_minute', rpm: -160 }), 'rpm')
  })

  it('is a state-free POST but still needs this site\'s Origin, like every POST', async () => {
    const answer = await anonymous.post('/api/custom/fit', { script: 'Hello', format: 'two_minute' }, { origin: null })
    expect(answer.status).toBe(403)
  })
})

describe('GET /api/workshop/bench/reaming (maker)', () => {
  it('3/16 in showing with 7/16 in wanted: 4 reamings, one set, ending at 7/16 (common practice, no source)', async () => {
    const answer = await maker.get(`/api/workshop/bench/reaming?overhang=3/16&target=7/16&perReaming=1/16&setSize=4`)
    expect(answer.status).toBe(200)
    expect(answer.body.reamings).toBe(4)
    expect(answer.body.sets).toBe(1)
    expect(answer.body.steps).toEqual([{ afterReamings: 4, overhangIn: 0.4375 }])
    expect(answer.body.warnings.join(' ')).toMatch(/Over-reaming cannot be undone/)
  })

  it('15/16 in still to go at 1/16 a reaming: 15 reamings in sets of four (common practice, no source)', async () => {
    const answer = await maker.get(`/api/workshop/bench/reaming?overhang=${encodeURIComponent('-1/2')}&target=7/16`)
    expect(answer.body.reamings).toBe(15)
    expect(answer.body.sets).toBe(4)
    expect(answer.body.steps.map((step: any) => step.afterReamings)).toEqual([4, 8, 12, 15])
    // −1/2 + 4/16 = −0.25; −1/2 + 8/16 = 0; −1/2 + 12/16 = 0.25; the last step ends at the target.
    expect(answer.body.steps.map((step: any) => step.overhangIn)).toEqual([-0.25, 0, 0.25, 0.4375])
  })

  it('uses the shop\'s settings when only the overhang is given, and refuses to plan past the fit', async () => {
    const defaults = await maker.get('/api/workshop/bench/reaming?overhang=3/16')
    expect(defaults.body.reamings).toBe(4)
    const past = await maker.get('/api/workshop/bench/reaming?overhang=1/2&target=7/16')
    expect(past.status).toBe(200)
    expect(past.body.reamings).toBe(0)
    expect(past.body.steps).toEqual([])
    expect(past.body.warnings.join(' ')).toMatch(/past the wanted fit.*cannot be undone/)
  })

  it('takes millimetres: 4.7625 mm is 3/16 in (NIST)', async () => {
    const answer = await maker.get(`/api/workshop/bench/reaming?overhang=${encodeURIComponent('4.7625 mm')}&target=7/16`)
    expect(answer.body.reamings).toBe(4)
  })

  it('refuses letters, 7/0, a missing overhang, a negative travel, a bad set size and an absurd plan, naming each field', async () => {
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=abc'), 'overhang')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=7/0'), 'overhang')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?target=7/16'), 'overhang')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=3/16&target=seven'), 'target')
    expectFieldError(await maker.get(`/api/workshop/bench/reaming?overhang=3/16&perReaming=${encodeURIComponent('-1/16')}`), 'perReaming')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=3/16&setSize=2.5'), 'setSize')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=3/16&setSize=four'), 'setSize')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=3/16&temperatureF=warm'), 'temperatureF')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=-5000'), 'overhang')
    expectFieldError(await maker.get('/api/workshop/bench/reaming?overhang=0&perReaming=1/1000000000'), 'perReaming')
  })
})

describe('GET /api/workshop/bench/shaving (maker)', () => {
  it('high 2.200, low 2.194, wheel 45°: 0.003 in a pass, one pass, 2.194 in after (common practice, no source)', async () => {
    const answer = await maker.get('/api/workshop/bench/shaving?high=2.200&low=2.194&wheel=45&min=2.10&perSurface=0.003')
    expect(answer.status).toBe(200)
    // 45° of the wheel = 0.003 in: common practice, no source.
    expect(answer.body.infeedIn).toBeCloseTo(0.003, 6)
    // (2.200 − 2.194) ÷ 2 = 0.003 in to clean up: one pass.
    expect(answer.body.passes).toBe(1)
    expect(answer.body.diameterAfterIn).toBeCloseTo(2.194, 4)
    // (2.194 − 2.10) ÷ (2 × 0.003) = 15.7 → 15 whole surfaces left.
    expect(answer.body.surfacesLeft).toBe(15)
    expect(answer.body.warnings).toEqual([])
  })

  it('a full turn of the wheel is 0.024 in and is warned about as deeper than a pass should go (common practice; forum practice)', async () => {
    const answer = await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.19&wheel=360')
    // 360° = 8 × 45° = 8 × 0.003 = 0.024 in: common practice, no source.
    expect(answer.body.infeedIn).toBeCloseTo(0.024, 6)
    expect(answer.body.passes).toBe(1)
    // Deepest cut per pass about 0.003 in on the radius: collectors' forum practice.
    expect(answer.body.warnings.join(' ')).toMatch(/deeper than the 0\.0030 in/)
  })

  it('several passes when the high spot stands proud, and a warning under the minimum diameter', async () => {
    const several = await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.18')
    // (2.2 − 2.18) ÷ 2 = 0.010 in ÷ 0.003 = 3.3 → 4 passes; 2.2 − 2 × 4 × 0.003 = 2.176 in.
    expect(several.body.passes).toBe(4)
    expect(several.body.diameterAfterIn).toBeCloseTo(2.176, 4)
    expect(several.body.steps).toHaveLength(4)
    const under = await maker.get('/api/workshop/bench/shaving?high=2.105&low=2.1&min=2.10')
    expect(under.body.warnings.join(' ')).toMatch(/under the shop's minimum diameter/)
  })

  it('takes a depth to clean up instead of the low reading', async () => {
    const answer = await maker.get('/api/workshop/bench/shaving?high=2.2&depth=0.006')
    expect(answer.body.passes).toBe(2)
  })

  it('refuses letters, negatives, 7/0, a missing reading, low above high and an absurd plan, naming each field', async () => {
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=big&low=2.194'), 'high')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=-2.2&low=2.194'), 'high')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=7/0'), 'low')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?low=2.194'), 'high')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2'), 'low')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.194&low=2.2'), 'low')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.194&wheel=quarter'), 'wheel')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.194&wheel=0'), 'wheel')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.194&min=-2'), 'min')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.194&perSurface=0'), 'perSurface')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=2.194&wheel=0.0001'), 'wheel')
    expectFieldError(await maker.get('/api/workshop/bench/shaving?high=2.2&low=0.001'), 'low')
  })
})

describe('GET /api/workshop/bench/heat-fit and heat-risk (maker)', () => {
  it('a 20 °F rise on the standard 1.69 in bore in stearic acid (engineering handbook tables; taper from memory, UNVERIFIED)', async () => {
    const answer = await maker.get('/api/workshop/bench/heat-fit?temperature=95&unit=F&wax=stearic_acid')
    expect(answer.status).toBe(200)
    // Reference fit temperature about 75 °F: common practice, no source.
    expect(answer.body.referenceTemperatureF).toBe(75)
    expect(answer.body.deltaK).toBeCloseTo(11.11, 2)
    // Linear ≈ volumetric ÷ 3: 810×10⁻⁶ ÷ 3 = 270×10⁻⁶ per K (engineering handbook tables).
    expect(answer.body.linearExpansionPerK).toBeCloseTo(270e-6, 9)
    // 1.69 in × 270×10⁻⁶ × 100/9 K = 0.00507 in.
    expect(answer.body.boreGrowthIn).toBeCloseTo(1.69 * 270e-6 * (100 / 9), 5)
    // Along a 3/8 in per foot taper (from memory, UNVERIFIED): 0.00507 ÷ (0.375 ÷ 12) = 0.1622 in.
    expect(answer.body.extraTravelIn).toBeCloseTo((1.69 * 270e-6 * (100 / 9)) / (0.375 / 12), 3)
    expect(answer.body.taperPerFootIn).toBe(0.375)
    expect(answer.body.taperUnverified).toBe(true)
    expect(answer.body.notes.join(' ')).toMatch(/unverified/)
    expect(answer.body.waxFormulas.map((wax: any) => wax.id)).toEqual(['stearic_acid', 'paraffin'])
  })

  it('refuses an unknown wax, letters for the temperature, an unknown unit and a negative bore, naming each field', async () => {
    expectFieldError(await maker.get('/api/workshop/bench/heat-fit?temperature=95&wax=beeswax'), 'wax')
    expectFieldError(await maker.get('/api/workshop/bench/heat-fit?temperature=hot'), 'temperature')
    expectFieldError(await maker.get('/api/workshop/bench/heat-fit'), 'temperature')
    expectFieldError(await maker.get('/api/workshop/bench/heat-fit?temperature=95&unit=K'), 'unit')
    expectFieldError(await maker.get('/api/workshop/bench/heat-fit?temperature=95&bore=-1.69'), 'bore')
    expectFieldError(await maker.get('/api/workshop/bench/heat-fit?temperature=95&bore=7/0'), 'bore')
  })

  it('heat risk: ok, caution and hold against the shop\'s thresholds, with an early-in-week day to ship', async () => {
    const ok = await maker.get('/api/workshop/bench/heat-risk?high=20&days=1')
    expect(ok.status).toBe(200)
    expect(ok.body.level).toBe('ok')
    expect(ok.body.shipOn).toMatch(/^\d{4}-\d{2}-\d{2}$/)
    expect([1, 2]).toContain(new Date(`${ok.body.shipOn}T12:00:00Z`).getUTCDay())
    // Default thresholds: caution from 27 °C, hold from 32 °C (shop choices).
    expect((await maker.get('/api/workshop/bench/heat-risk?high=28&days=1')).body.level).toBe('caution')
    expect((await maker.get('/api/workshop/bench/heat-risk?high=90&unit=F&days=1')).body.level).toBe('hold')
    // Each day beyond the first lowers both by 1 °C: 26 °C with 3 days is past 27 − 2 = 25.
    expect((await maker.get('/api/workshop/bench/heat-risk?high=26&days=3')).body.level).toBe('caution')
  })

  it('heat risk refuses letters, a missing forecast and part days, naming each field', async () => {
    expectFieldError(await maker.get('/api/workshop/bench/heat-risk?high=warm&days=1'), 'high')
    expectFieldError(await maker.get('/api/workshop/bench/heat-risk?days=1'), 'high')
    expectFieldError(await maker.get('/api/workshop/bench/heat-risk?high=30&days=1.5'), 'days')
    expectFieldError(await maker.get('/api/workshop/bench/heat-risk?high=30&days=-1'), 'days')
  })
})

describe('the workshop bench is for makers only', () => {
  const makerRoutes = [
    '/api/workshop/bench/reaming?overhang=3/16',
    '/api/workshop/bench/shaving?high=2.2&low=2.194',
    '/api/workshop/bench/heat-fit?temperature=95',
    '/api/workshop/bench/heat-risk?high=30&days=1',
  ]

  it('answers an anonymous visitor 401', async () => {
    for (const path of makerRoutes) expect((await anonymous.get(path)).status, path).toBe(401)
  })

  it('answers a collector and a shipper 403', async () => {
    for (const role of ['collector', 'shipper']) {
      const client = await signedIn(account(role).email, account(role).password)
      for (const path of makerRoutes) expect((await client.get(path)).status, `${role} ${path}`).toBe(403)
    }
  })

  it('checks the role before the input, so a stranger learns nothing from the errors', async () => {
    expect((await anonymous.get('/api/workshop/bench/reaming?overhang=abc')).status).toBe(401)
  })

  it('lets anyone use the public calculators', async () => {
    const collector = await signedIn(account('collector').email, account('collector').password)
    expect((await collector.get('/api/bench/playing-time?length=3.6&tpi=100')).status).toBe(200)
  })
})

describe('the workshop figures: GET/PUT /api/workshop/settings/engine (maker)', () => {
  const path = '/api/workshop/settings/engine'

  it('refuses bad figures naming each by its path, keeps the old ones, and the bench uses the saved ones', async () => {
    const before = await maker.get(path)
    expect(before.status).toBe(200)
    expect(before.body.settings.speech.wordsPerMinute).toBe(150)
    const settings = before.body.settings
    try {
      const bad: [unknown, string][] = [
        [{ ...settings, speech: { ...settings.speech, wordsPerMinute: 'fast' } }, 'speech.wordsPerMinute'],
        [{ ...settings, heat: { ...settings.heat, cautionHighC: 30, holdHighC: 25 } }, 'heat.holdHighC'],
        [{ ...settings, fit: { ...settings.fit, taper: { perFootIn: 'steep', unverified: true } } }, 'fit.taper.perFootIn'],
        [{ ...settings, fit: { ...settings.fit, waxFormulas: [{ id: '', label: 'Unnamed', volumetricExpansionPerK: 0.0007 }] } }, 'fit.waxFormulas.0.id'],
        [{ ...settings, fit: { ...settings.fit, waxFormulas: [settings.fit.waxFormulas[0], settings.fit.waxFormulas[0]] } }, 'fit.waxFormulas'],
        [{ ...settings, packing: { ...settings.packing, cushioningIn: 1 } }, 'packing.cushioningIn'],
      ]
      for (const [body, field] of bad) {
        const answer = await maker.put(path, body)
        expect(answer.status, JSON.stringify(answer.body)).toBe(400)
        expect(Object.keys(answer.body.data.fields)).toContain(field)
      }
      expect((await maker.get(path)).body.settings).toEqual(settings)

      // The taper typed as a fraction (stored in inches) and a new wax reach the heat-and-fit calculator.
      const changed = await maker.put(path, {
        ...settings,
        fit: { ...settings.fit, taper: { perFootIn: '1/2', unverified: false }, waxFormulas: [...settings.fit.waxFormulas, { id: 'house_blend', label: 'House blend', volumetricExpansionPerK: 0.0007 }] },
      })
      expect(changed.status, JSON.stringify(changed.body)).toBe(200)
      expect(changed.body.settings.fit.taper).toEqual({ perFootIn: 0.5, unverified: false })
      const fit = await maker.get('/api/workshop/bench/heat-fit?temperature=95&unit=F&wax=house_blend')
      expect(fit.status, JSON.stringify(fit.body)).toBe(200)
      expect(fit.body.taperPerFootIn).toBe(0.5)
      expect(fit.body.taperUnverified).toBe(false)
      expect(fit.body.waxFormulas.map((wax: { id: string }) => wax.id)).toContain('house_blend')
    }
    finally {
      expect((await maker.put(path, settings)).status).toBe(200)
    }
    expect((await maker.get(path)).body.settings).toEqual(settings)
  })

  it('is the maker\'s alone', async () => {
    expect((await anonymous.get(path)).status).toBe(401)
    expect((await anonymous.request(path, { method: 'PUT', body: {} })).status).toBe(401)
  })
})
