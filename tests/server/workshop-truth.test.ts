import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { makeSurfaceWav } from '../../server/audio'
import { cylinderFormatTable, playingTimeMinutes } from '../../shared/utils/cylinder'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import type { Client } from './harness'
import { signedIn, useTestServer, waitFor } from './harness'

// Full-length takes are megabytes each: they go to a folder of this run's own.
const env = await useTestServer({ NUXT_UPLOADS_DIR: mkdtempSync(join(tmpdir(), 'gw-truth-uploads-')) })
const payments = env.payments
const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let collector: Client
const batchOf: Record<string, number> = {}
let counter = 0
const address = { name: 'Tamsin Orrell', line1: '4 Wick Lane', city: 'Lowmere', postalCode: 'LM3 1WL', region: 'OR', country: 'US' }

// Playing time of a surface = recorded length (in) × grooves per inch ÷ rpm (shared/utils/cylinder.ts,
// `playingTimeMinutes`, with the format table's recordable lengths: 3.6 in × 100 ÷ 160 = 2.25 min for a
// 2-minute blank, 3.8 in × 200 ÷ 160 = 4.75 min for a 4-minute one — the archives' playing times).
const fullSeconds = (format: 'two_minute' | 'four_minute') =>
  Math.ceil(playingTimeMinutes(cylinderFormatTable[format].defaultRecordableLengthIn, cylinderFormatTable[format].groovesPerInch, 160) * 60)
// Synthetic steady hiss (server/audio/synth.ts) at the lowest rate the reader takes, 22.05 kHz mono 16-bit.
const quiet = (seconds: number) => makeSurfaceWav({ seconds, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed: 11 })

async function fake(path: string, body?: unknown) {
  const response = await fetch(`${payments.url}${path}`, { method: body === undefined ? 'GET' : 'POST', headers: { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) })
  return await response.json() as any
}

async function upload(path: string, bytes: Uint8Array, fields: Record<string, string> = {}) {
  const form = new FormData()
  form.append('file', new Blob([bytes], { type: 'audio/wav' }), 'take.wav')
  for (const [name, value] of Object.entries(fields)) form.append(name, value)
  const target = url(path)
  const headers = { origin: new URL(target).origin, accept: 'application/json', cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') }
  const response = await fetch(target, { method: 'POST', body: form, headers })
  return { status: response.status, body: await response.json() as any }
}

async function shavedBlank(format: 'two_minute' | 'four_minute', wax: string): Promise<string> {
  const created = await maker.post('/api/workshop/blanks', { batchId: batchOf[wax], format, count: 1, diameterIn: '2.206' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const code = created.body.codes[0] as string
  expect((await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
  expect((await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)
  return code
}

async function testedBlank(format: 'two_minute' | 'four_minute', wax: string): Promise<string> {
  const code = await shavedBlank(format, wax)
  const tested = await upload(`/api/workshop/blanks/${code}/surface-tests`, quiet(fullSeconds(format)))
  expect(tested.status, JSON.stringify(tested.body)).toBe(201)
  expect(tested.body.finalVerdict).toBe('pass')
  return code
}

async function product(format: 'two_minute' | 'four_minute', waxFormulaId: string | null) {
  const answer = await maker.post('/api/workshop/products', {
    slug: `truth-${Date.now()}-${++counter}`, title: `Truth ${counter}`, kind: 'recorded', performer: 'The Test Quartet', runningTimeS: 100,
    format, material: 'wax', priceMinor: 3000, stock: 100, madeToOrder: true, waxFormulaId,
  })
  expect(answer.status, JSON.stringify(answer.body)).toBe(201)
  expect(answer.body.waxFormulaId).toBe(waxFormulaId)
  return answer.body as { slug: string }
}

async function paidTickets(slugs: string[]) {
  const created = await collector.post('/api/checkout', { items: slugs.map(slug => ({ slug, qty: 1 })), email: `truth-${Date.now()}-${++counter}@collectors.test`, shippingAddress: address, zone: 'domestic' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  await fake(`/_fake/sessions/${created.body.url.split('/').pop()}/complete?wait=true`, {})
  return await waitFor(async () => {
    const found = (await maker.get(`/api/workshop/tickets?q=${created.body.orderNumber}`)).body.tickets as any[]
    return found.length === slugs.length ? found.sort((a, b) => a.orderItemId - b.orderItemId || a.unit - b.unit) : null
  }, 10_000, 'tickets')
}

const pickerCodes = async (ticketId: number) => {
  const answer = await maker.get(`/api/workshop/tickets/${ticketId}/blanks`)
  expect(answer.status).toBe(200)
  return (answer.body.blanks as { code: string }[]).map(blank => blank.code)
}

beforeAll(async () => {
  maker = await signedIn(account('maker').email, account('maker').password)
  collector = await signedIn(account('collector').email, account('collector').password)
  const wrong = await maker.post('/api/workshop/batches', { code: 'TR-26-00', formula: 'beeswax', pourDate: '2026-05-01', volumetricExpansionPerK: 0.0007, waxFormulaId: 'beeswax' })
  expect(wrong.status).toBe(400)
  expect(wrong.body.data.fields.waxFormulaId).toMatch(/not one of the shop's wax formulas/)
  for (const wax of ['stearic_acid', 'paraffin']) {
    const batch = await maker.post('/api/workshop/batches', { code: `TR-26-${wax === 'paraffin' ? 2 : 1}`, formula: wax, pourDate: '2026-05-01', volumetricExpansionPerK: 0.0007, waxFormulaId: wax })
    expect(batch.status, JSON.stringify(batch.body)).toBe(201)
    expect(batch.body.waxFormulaId).toBe(wax)
    batchOf[wax] = batch.body.id
  }
})

describe('a surface test covers the surface', () => {
  it('a 20 s take on a 4-minute surface is incomplete; the full-length take of the same noise gets its normal verdict', async () => {
    expect(fullSeconds('four_minute')).toBe(285)
    const code = await shavedBlank('four_minute', 'paraffin')
    const short = await upload(`/api/workshop/blanks/${code}/surface-tests`, quiet(20))
    expect(short.status, JSON.stringify(short.body)).toBe(201)
    expect([short.body.computedVerdict, short.body.finalVerdict]).toEqual(['incomplete', 'incomplete'])
    // 20 s of 285 s is 7 %, under the shop's 90 %.
    expect(short.body.figures.reasons[0]).toBe('20 s covers 7 % of the 4 min 45 s surface (at least 90 % is needed); play it through to the end.')
    expect((await maker.get(`/api/workshop/blanks/${code}`)).body.blank.state).toBe('shaved')
    // Not overruled into a pass.
    const overruled = await upload(`/api/workshop/blanks/${code}/surface-tests`, quiet(20), { finalVerdict: 'pass', overruleReason: 'sounded fine' })
    expect(overruled.status).toBe(400)
    expect(overruled.body.data.fields.finalVerdict).toMatch(/incomplete/)

    const full = await upload(`/api/workshop/blanks/${code}/surface-tests`, quiet(fullSeconds('four_minute')))
    expect(full.status, JSON.stringify(full.body)).toBe(201)
    expect([full.body.computedVerdict, full.body.finalVerdict]).toEqual(['pass', 'pass'])
    expect(full.body.figures.coverage.percent).toBe(100)
    expect((await maker.get(`/api/workshop/blanks/${code}`)).body.blank.state).toBe('tested_pass')
  })
})

describe('the right blank for the order', () => {
  let paraffinTicket: number
  let stearicTicket: number
  // Made by the first test that needs them (a describe's own beforeAll runs outside the server's context).
  async function ensureTickets() {
    if (paraffinTicket) return
    const paraffin = await product('two_minute', 'paraffin')
    const plain = await product('four_minute', null)
    const tickets = await paidTickets([paraffin.slug, plain.slug])
    paraffinTicket = tickets.find(ticket => ticket.format === 'two_minute').id
    stearicTicket = tickets.find(ticket => ticket.format === 'four_minute').id
  }

  it('the picker offers only blanks of the item\'s format and wax; assign refuses the others naming the wax, and takes one with a reason, kept and printed', async () => {
    await ensureTickets()
    const right = await testedBlank('two_minute', 'paraffin')
    const otherWax = await testedBlank('two_minute', 'stearic_acid')
    const otherFormat = await testedBlank('four_minute', 'paraffin')
    const picker = await maker.get(`/api/workshop/tickets/${paraffinTicket}/blanks`)
    expect(picker.body.waxFormula).toBe('Paraffin')
    const offered = picker.body.blanks.map((blank: any) => blank.code)
    expect(offered).toContain(right)
    expect(offered).not.toContain(otherWax)
    expect(offered).not.toContain(otherFormat)
    expect(picker.body.blanks.every((blank: any) => blank.waxFormulaId === 'paraffin' && blank.format === 'two_minute')).toBe(true)

    const wax = await maker.post(`/api/workshop/tickets/${paraffinTicket}/assign`, { blankCode: otherWax })
    expect(wax.status).toBe(409)
    expect(wax.body.message).toContain(`This order wants Paraffin wax; blank ${otherWax} is Stearic acid`)
    const format = await maker.post(`/api/workshop/tickets/${paraffinTicket}/assign`, { blankCode: otherFormat })
    expect(format.status).toBe(409)
    expect(format.body.message).toMatch(/needs a 2-minute one of Paraffin wax/)
    const tooLong = await maker.post(`/api/workshop/tickets/${paraffinTicket}/assign`, { blankCode: otherWax, overrideReason: 'x'.repeat(301) })
    expect(tooLong.status).toBe(400)
    expect(tooLong.body.data.fields.overrideReason).toBeTruthy()

    const reason = 'The customer asked for the harder wax by telephone.'
    const taken = await maker.post(`/api/workshop/tickets/${paraffinTicket}/assign`, { blankCode: otherWax, overrideReason: reason })
    expect(taken.status, JSON.stringify(taken.body)).toBe(200)
    expect(taken.body.overrideReason).toBe(reason)
    const detail = await maker.get(`/api/workshop/tickets/${paraffinTicket}`)
    expect(detail.body.blankOverrideReason).toBe(reason)
    expect(detail.body.wantedWax).toBe('Paraffin')

    const recorder = await maker.post('/api/workshop/recorders', { name: `Truth Lathe ${++counter}`, stylus: 'sapphire', horn: 'brass' })
    expect((await maker.post(`/api/workshop/tickets/${paraffinTicket}/cut`, { recorderId: recorder.body.id })).status).toBe(200)
    const certificate = await maker.get(`/api/certificates/${paraffinTicket}`)
    expect(certificate.status).toBe(200)
    expect(certificate.body.blankOverrideReason).toBe(reason)
    expect(certificate.body.batch.waxFormula).toBe('Stearic acid')
  })

  it('an incomplete test and a stale pass are never offered, and assign refuses them (the stale one naming its test date)', async () => {
    await ensureTickets()
    const incomplete = await shavedBlank('four_minute', 'stearic_acid')
    expect((await upload(`/api/workshop/blanks/${incomplete}/surface-tests`, quiet(20))).body.finalVerdict).toBe('incomplete')
    // The demo keeps one 4-minute blank whose pass is older than the shop's 90 days.
    const register = await maker.get('/api/workshop/blanks?state=tested_pass&format=four_minute&pageSize=200')
    let stale: { code: string, testedAt: string } | undefined
    for (const row of register.body.blanks ?? register.body.rows ?? register.body.items) {
      const dossier = await maker.get(`/api/workshop/blanks/${row.code}`)
      const test = dossier.body.surfaceTests.find((t: any) => t.stale)
      if (test) stale = { code: row.code, testedAt: test.testedAt }
    }
    expect(stale, 'a stale demo blank').toBeTruthy()
    expect(Date.now() - Date.parse(stale!.testedAt)).toBeGreaterThan(90 * 86_400_000)

    const offered = await pickerCodes(stearicTicket)
    expect(offered.length).toBeGreaterThan(0)
    expect(offered).not.toContain(incomplete)
    expect(offered).not.toContain(stale!.code)
    const refusedIncomplete = await maker.post(`/api/workshop/tickets/${stearicTicket}/assign`, { blankCode: incomplete })
    expect(refusedIncomplete.status).toBe(409)
    const refusedStale = await maker.post(`/api/workshop/tickets/${stearicTicket}/assign`, { blankCode: stale!.code })
    expect(refusedStale.status).toBe(409)
    expect(refusedStale.body.message).toContain(`passed its surface test on ${stale!.testedAt.slice(0, 10)}`)
    expect(refusedStale.body.message).toMatch(/stale, test it again/)
    // The override reason is for another wax or format, not for an old test.
    expect((await maker.post(`/api/workshop/tickets/${stearicTicket}/assign`, { blankCode: stale!.code, overrideReason: 'it was fine' })).status).toBe(409)
  })
})

describe('recorders in trouble', () => {
  it('the recorders answer marks a recorder whose latest test cut failed and one out of service, and suggests only one in good standing', async () => {
    const name = (what: string) => `Truth ${what} ${++counter}`
    const failing = (await maker.post('/api/workshop/recorders', { name: name('Failing'), stylus: 'sapphire', horn: 'brass' })).body
    const resting = (await maker.post('/api/workshop/recorders', { name: name('Resting'), stylus: 'sapphire', horn: 'brass', inService: false })).body
    const loud = makeSurfaceWav({ seconds: 6, sampleRate: 22_050, levelDbfs: -38, swellDepth: 0.02, seed: 5 })
    const cut = await upload('/api/workshop/test-cuts', loud, { recorderId: String(failing.id) })
    expect(cut.status, JSON.stringify(cut.body)).toBe(201)
    expect(cut.body.verdict ?? cut.body.testCut?.verdict).toBe('fail')
    const answer = await maker.get('/api/workshop/recorders')
    const standing = (id: number) => answer.body.recorders.find((row: any) => row.id === id).standing
    expect(standing(failing.id)).toBe('last_cuts_failed')
    expect(standing(resting.id)).toBe('out_of_service')
    const suggested = answer.body.recorders.find((row: any) => row.id === answer.body.suggested.id)
    expect(suggested.standing).toBe('good')
  })
})
