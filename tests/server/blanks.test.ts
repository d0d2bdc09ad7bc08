import { mkdtempSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { analyseSurfaceWav, makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

const uploadsDir = mkdtempSync(join(tmpdir(), 'gw-blank-uploads-'))
await useTestServer({ NUXT_UPLOADS_DIR: uploadsDir })

const account = (role: string) => demoAccounts.find(a => a.role === role)!
let maker: Client
let collector: Client
let shipper: Client
let batchId: number

beforeAll(async () => {
  expect((await new Client().get('/api/health')).status).toBe(200)
  maker = await signedIn(account('maker').email, account('maker').password)
  // These tests use short synthetic takes; the rule that a take covers the surface (coveragePercent) is tested in workshop-truth.test.ts.
  expect((await maker.put('/api/workshop/settings/surface', { coveragePercent: 1 })).status).toBe(200)
  collector = await signedIn(account('collector').email, account('collector').password)
  shipper = await signedIn(account('shipper').email, account('shipper').password)
  const batch = await maker.post('/api/workshop/batches', {
    code: 'T-26-01',
    formula: 'stearic acid 75 / paraffin 15 / carnauba 10',
    pourDate: '2026-04-02',
    volumetricExpansionPerK: 0.00075,
    softeningPointC: 62,
  })
  expect(batch.status).toBe(201)
  batchId = batch.body.id
})

// ——— helpers ———

const codeNumber = (code: string) => Number(code.split('-')[2])

async function newBlanks(format: 'two_minute' | 'four_minute', count = 1, extra: Record<string, unknown> = {}): Promise<string[]> {
  const answer = await maker.post('/api/workshop/blanks', { batchId, format, count, diameterIn: '2.206', ...extra })
  expect(answer.status).toBe(201)
  return answer.body.codes
}

const reamFully = (code: string) => maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })
const shaveOnce = (code: string) => maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })

async function shavedBlank(format: 'two_minute' | 'four_minute' = 'two_minute'): Promise<string> {
  const [code] = await newBlanks(format)
  expect((await reamFully(code!)).status).toBe(201)
  expect((await shaveOnce(code!)).status).toBe(201)
  return code!
}

/** A multipart upload as the browser sends it (cookie and this site's Origin). */
async function upload(client: Client | null, path: string, file: { name: string, bytes: Uint8Array } | null, fields: Record<string, string> = {}) {
  const form = new FormData()
  if (file) form.append('file', new Blob([file.bytes], { type: 'audio/wav' }), file.name)
  for (const [name, value] of Object.entries(fields)) form.append(name, value)
  const target = url(path)
  const headers: Record<string, string> = { origin: new URL(target).origin, accept: 'application/json' }
  if (client?.cookies.size) headers.cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const response = await fetch(target, { method: 'POST', body: form, headers })
  const text = await response.text()
  let body: any = text
  try {
    body = JSON.parse(text)
  }
  catch { /* not JSON */ }
  return { status: response.status, body, headers: response.headers }
}

// Synthetic play-throughs with known answers (server/audio/synth.ts): 8 s at 22.05 kHz.
const quietWav = () => makeSurfaceWav({ seconds: 8, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed: 41 })
const clickyWav = () => makeSurfaceWav({ seconds: 8, sampleRate: 22_050, levelDbfs: -57, clicks: 3, seed: 42 })

// ——— codes ———

describe('blank codes', () => {
  it('stay unique and gapless under 50 concurrent creations', async () => {
    const answers = await Promise.all(Array.from({ length: 50 }, (_, i) => maker.post('/api/workshop/blanks', { batchId, format: i % 2 ? 'two_minute' : 'four_minute' })))
    expect(answers.map(a => a.status)).toEqual(Array(50).fill(201))
    const codes = answers.flatMap(a => a.body.codes as string[])
    expect(new Set(codes).size).toBe(50)
    const year = String(new Date().getUTCFullYear() % 100).padStart(2, '0')
    for (const code of codes) expect(code).toMatch(new RegExp(`^GW-${year}-\\d{4}$`))
    const numbers = codes.map(codeNumber).sort((a, b) => a - b)
    expect(numbers.at(-1)! - numbers[0]!).toBe(49)
    // The next creation of several continues the same sequence without a gap.
    const more = await newBlanks('two_minute', 3)
    expect(more.map(codeNumber)).toEqual([numbers.at(-1)! + 1, numbers.at(-1)! + 2, numbers.at(-1)! + 3])
  })

  it('refuses a batch that does not exist and a count out of range, naming the field', async () => {
    const noBatch = await maker.post('/api/workshop/blanks', { batchId: 999_999, format: 'two_minute' })
    expect(noBatch.status).toBe(400)
    expect(noBatch.body.data.fields).toHaveProperty('batchId')
    const tooMany = await maker.post('/api/workshop/blanks', { batchId, format: 'two_minute', count: 201 })
    expect(tooMany.status).toBe(400)
    expect(tooMany.body.data.fields).toHaveProperty('count')
  })
})

// ——— logs ———

describe('reaming and shaving', () => {
  it('logs a reaming session with the engine\'s plan beside it', async () => {
    const [code] = await newBlanks('four_minute')
    const answer = await reamFully(code!)
    expect(answer.status).toBe(201)
    expect(answer.body.state).toBe('reamed')
    // 3/16 in showing with 7/16 in wanted: 4/16 in to go, 4 reamings, one set (common practice, no source).
    expect(answer.body.reaming.plan).toMatchObject({ status: 'plan', reamingsToFit: 4, sets: 1, targetIn: 0.4375, expectedAfterIn: 0.4375, remainingAfter: 0 })
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.status).toBe(200)
    expect(dossier.body.reamings).toHaveLength(1)
    expect(dossier.body.reamings[0]).toMatchObject({ overhangBeforeIn: 0.1875, overhangAfterIn: 0.4375, reamings: 4, roomTemperatureF: 74, by: account('maker').name })
    expect(dossier.body.history.map((e: any) => e.kind)).toEqual(['state', 'reaming', 'state'])
  })

  it('refuses an overhang that shrinks with reaming (400 naming the field)', async () => {
    const [code] = await newBlanks('two_minute')
    const answer = await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '5/16', overhangAfterIn: '3/16', reamings: 2, roomTemperatureF: 74 })
    expect(answer.status).toBe(400)
    expect(answer.body.data.fields).toHaveProperty('overhangAfterIn')
  })

  it('logs a shaving pass with the plan; refuses shaving a cast blank and a diameter that grows', async () => {
    const [code] = await newBlanks('two_minute')
    const early = await shaveOnce(code!)
    expect(early.status).toBe(409)
    expect(early.body.message).toMatch(/Ream the bore first/)

    await reamFully(code!)
    const grows = await maker.post(`/api/workshop/blanks/${code}/shaving`, { diameterAfterIn: '2.210' })
    expect(grows.status).toBe(400)
    expect(grows.body.data.fields).toHaveProperty('diameterAfterIn')

    const answer = await shaveOnce(code!)
    expect(answer.status).toBe(201)
    expect(answer.body.state).toBe('shaved')
    // (2.206 − 2.200) ÷ 2 = 0.003 in to clean up; 45° of wheel feeds 0.003 in (common practice, no source): one pass,
    // and the diameter falls by twice the cut: 2.206 − 0.006 = 2.200 in.
    expect(answer.body.shaving.plan.passesToCleanUp).toBe(1)
    expect(answer.body.shaving.plan.infeedIn).toBeCloseTo(0.003, 9)
    expect(answer.body.shaving.plan.expectedAfterIn).toBeCloseTo(2.2, 9)
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.body.blank).toMatchObject({ state: 'shaved', diameterIn: 2.2, surfacesUsed: 0, currentSurface: 1 })
    expect(dossier.body.shavings[0]).toMatchObject({ surface: 1, diameterBeforeIn: 2.206, lowDiameterIn: 2.2, wheelDegrees: 45, passes: 1, diameterAfterIn: 2.2 })
  })

  it('takes a reaming after shaving only as a refit, which spends the surface', async () => {
    const code = await shavedBlank()
    const plain = await reamFully(code)
    expect(plain.status).toBe(409)
    expect(plain.body.message).toMatch(/refit/)
    const refit = await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '7/16', overhangAfterIn: '7/16', reamings: 1, roomTemperatureF: 75, refit: true })
    expect(refit.status).toBe(201)
    expect(refit.body).toMatchObject({ state: 'reamed', surfacesUsed: 1 })
  })

  it('keeps location, notes and a corrected diameter, each logged', async () => {
    const [code] = await newBlanks('two_minute')
    const answer = await maker.request(`/api/workshop/blanks/${code}`, { method: 'PATCH', body: { location: 'Rack C, shelf 1', notes: 'slight seam', diameterIn: '2 13/64' } })
    expect(answer.status).toBe(200)
    expect(answer.body.changed.sort()).toEqual(['diameterIn', 'location', 'notes'])
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.body.blank).toMatchObject({ location: 'Rack C, shelf 1', notes: 'slight seam', diameterIn: 2 + 13 / 64 })
    expect(dossier.body.history.at(-1).kind).toBe('note')
  })
})

// ——— surface tests ———

describe('surface tests', () => {
  it('stores the figures the audio engine gives for the same file, with the file, who and when', async () => {
    const code = await shavedBlank('four_minute')
    const bytes = quietWav()
    const answer = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'play-through.wav', bytes }, { listeningNotes: 'Even hiss.' })
    expect(answer.status).toBe(201)
    const engine = JSON.parse(JSON.stringify(analyseSurfaceWav(bytes, { rpm: 160 })))
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    const [test] = dossier.body.surfaceTests
    // Plus how much of the surface the take covers: 8 s of the 4-minute surface's 285 s (3.8 in × 200 ÷ 160 rpm,
    // shared/utils/cylinder.ts), judged against the 1 % these tests set.
    expect(test.figures).toEqual({ ...engine, coverage: { durationS: 8, playingTimeS: 285, percent: 800 / 285, required: 1, complete: true } })
    expect(test).toMatchObject({
      surface: 1,
      rpm: 160,
      aWeightedDbfs: engine.aWeightedDbfs,
      rotaryDb: engine.rotaryDb,
      clicksPerMinute: engine.clicksPerMinute,
      computedVerdict: 'pass',
      finalVerdict: 'pass',
      overruleReason: null,
      listeningNotes: 'Even hiss.',
      testedBy: account('maker').name,
    })
    // The synthetic surface was made at −58 dBFS RMS (AES17): the engine reads it back.
    expect(engine.rmsDbfs).toBeCloseTo(-58, 1)
    expect(dossier.body.blank.state).toBe('tested_pass')

    // The WAV is kept as sent, for makers only.
    const asMaker = await fetch(url(test.fileUrl), { headers: { cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    expect(asMaker.status).toBe(200)
    expect(new Uint8Array(await asMaker.arrayBuffer())).toEqual(bytes)
    expect((await collector.get(test.fileUrl)).status).toBe(404)
  })

  it('keeps the reason of an overruled verdict, and refuses an overrule without one', async () => {
    const code = await shavedBlank()
    const bytes = clickyWav()
    expect(analyseSurfaceWav(bytes, { rpm: 160 }).verdict).toBe('fail')
    const without = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'clicks.wav', bytes }, { finalVerdict: 'pass' })
    expect(without.status).toBe(400)
    expect(without.body.data.fields).toHaveProperty('overruleReason')
    const reason = 'The clicks were dust on the stylus; a second play-through was clean.'
    const answer = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'clicks.wav', bytes }, { finalVerdict: 'pass', overruleReason: reason })
    expect(answer.status).toBe(201)
    expect(answer.body).toMatchObject({ computedVerdict: 'fail', finalVerdict: 'pass', overruled: true, overruleReason: reason })
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.body.blank.state).toBe('tested_pass')
    expect(dossier.body.surfaceTests[0].overruleReason).toBe(reason)
  })

  it('overrules later by PATCH (reason required) and adds listening notes', async () => {
    const code = await shavedBlank()
    const created = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'quiet.wav', bytes: quietWav() })
    expect(created.status).toBe(201)
    const path = `/api/workshop/blanks/${code}/surface-tests/${created.body.id}`
    const noReason = await maker.request(path, { method: 'PATCH', body: { finalVerdict: 'fail' } })
    expect(noReason.status).toBe(400)
    expect(noReason.body.data.fields).toHaveProperty('overruleReason')
    const overruled = await maker.request(path, { method: 'PATCH', body: { finalVerdict: 'fail', overruleReason: 'A thin whistle the figures miss.' } })
    expect(overruled.status).toBe(200)
    expect(overruled.body).toMatchObject({ finalVerdict: 'fail', overruleReason: 'A thin whistle the figures miss.' })
    expect((await maker.get(`/api/workshop/blanks/${code}`)).body.blank.state).toBe('tested_fail')
    const notes = await maker.request(path, { method: 'PATCH', body: { listeningNotes: 'Whistle at about 3 kHz.' } })
    expect(notes.status).toBe(200)
    expect(notes.body).toMatchObject({ listeningNotes: 'Whistle at about 3 kHz.', overruleReason: 'A thin whistle the figures miss.' })
  })

  it('reshaves a failed surface: back to shaved with one more surface used, and the next test is of surface 2', async () => {
    const code = await shavedBlank()
    expect((await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'clicks.wav', bytes: clickyWav() })).body.finalVerdict).toBe('fail')
    const reshave = await maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 1, reason: 'clicks', diameterAfterIn: '2.194', wheelDegrees: 45, passes: 1 })
    expect(reshave.status).toBe(201)
    expect(reshave.body).toMatchObject({ state: 'shaved', surfacesUsed: 1 })
    const next = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'quiet.wav', bytes: quietWav() })
    expect(next.status).toBe(201)
    expect(next.body.surface).toBe(2)
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.body.blank).toMatchObject({ state: 'tested_pass', surfacesUsed: 1, currentSurface: 2, diameterIn: 2.194 })
    expect(dossier.body.reshaves[0]).toMatchObject({ surfaceBefore: 1, surfaceNow: 2, reason: 'clicks' })
  })

  it('a reshave names the surface it leaves: a repeated or doubled request answers 409 and spends no second surface', async () => {
    const code = await shavedBlank()
    expect((await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'clicks.wav', bytes: clickyWav() })).body.finalVerdict).toBe('fail')
    const unnamed = await maker.post(`/api/workshop/blanks/${code}/reshave`, { reason: 'clicks' })
    expect(unnamed.status).toBe(400)
    expect(unnamed.body.data.fields).toHaveProperty('surface')

    const first = await maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 1, reason: 'clicks' })
    expect(first.status).toBe(201)
    expect(first.body).toMatchObject({ state: 'shaved', surfacesUsed: 1 })
    // The retry of the same click (the blank is now shaved, from which a reshave is otherwise allowed).
    const retry = await maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 1, reason: 'clicks' })
    expect(retry.status).toBe(409)
    expect(retry.body.message).toBe(`${code}: surface 1 is already spent; the blank is on surface 2 now (shaved). Nothing was changed.`)
    const ahead = await maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 3 })
    expect(ahead.status).toBe(409)
    expect(ahead.body.data).toMatchObject({ currentSurface: 2 })
    const dossier = await maker.get(`/api/workshop/blanks/${code}`)
    expect(dossier.body.blank).toMatchObject({ state: 'shaved', surfacesUsed: 1, currentSurface: 2 })
    expect(dossier.body.reshaves).toHaveLength(1)

    // Two at once from the same page: the row lock queues them, and only one spends a surface.
    const both = await Promise.all([1, 2].map(() => maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 2, reason: 'double click' })))
    expect(both.map(answer => answer.status).sort()).toEqual([201, 409])
    const after = await maker.get(`/api/workshop/blanks/${code}`)
    expect(after.body.blank.surfacesUsed).toBe(2)
    expect(after.body.reshaves).toHaveLength(2)
  })

  it('answers life-cycle conflicts with 409 and a sentence', async () => {
    const [cast] = await newBlanks('two_minute')
    const early = await upload(maker, `/api/workshop/blanks/${cast}/surface-tests`, { name: 'quiet.wav', bytes: quietWav() })
    expect(early.status).toBe(409)
    expect(early.body.message).toMatch(/needs a shaved blank/)
    const reshaveCast = await maker.post(`/api/workshop/blanks/${cast}/reshave`, { surface: 1 })
    expect(reshaveCast.status).toBe(409)

    const noReason = await maker.post(`/api/workshop/blanks/${cast}/scrap`, {})
    expect(noReason.status).toBe(400)
    expect(noReason.body.data.fields).toHaveProperty('reason')
    expect((await maker.post(`/api/workshop/blanks/${cast}/scrap`, { reason: 'Cracked in the mould.' })).status).toBe(200)
    const reshaveScrapped = await maker.post(`/api/workshop/blanks/${cast}/reshave`, { surface: 1 })
    expect(reshaveScrapped.status).toBe(409)
    expect(reshaveScrapped.body.message).toMatch(/scrapped/)
    expect((await maker.post(`/api/workshop/blanks/${cast}/scrap`, { reason: 'again' })).status).toBe(409)
    expect((await reamFully(cast!)).status).toBe(409)
  })

  it('refuses a reshave that would go under the shop\'s minimum diameter', async () => {
    const code = await shavedBlank()
    const answer = await maker.post(`/api/workshop/blanks/${code}/reshave`, { surface: 1, diameterAfterIn: '2.05' })
    expect(answer.status).toBe(409)
    expect(answer.body.message).toMatch(/minimum diameter/)
  })

  it('refuses a play-through too short to judge once-per-turn noise (422), storing nothing', async () => {
    const code = await shavedBlank()
    const answer = await upload(maker, `/api/workshop/blanks/${code}/surface-tests`, { name: 'short.wav', bytes: makeSurfaceWav({ seconds: 2, sampleRate: 22_050, seed: 3 }) })
    expect(answer.status).toBe(422)
    expect(answer.body.message).toMatch(/too short/)
    expect((await maker.get(`/api/workshop/blanks/${code}`)).body.surfaceTests).toHaveLength(0)
  })
})

// ——— register, batches, CSV ———

describe('register, batches and CSV', () => {
  it('filters by state, format, batch and code, sorts and pages', async () => {
    const all = await maker.get('/api/workshop/blanks?pageSize=200')
    expect(all.status).toBe(200)
    const shaved = await maker.get('/api/workshop/blanks?state=shaved&pageSize=200')
    expect(shaved.body.rows.length).toBeGreaterThan(0)
    expect(shaved.body.rows.every((row: any) => row.state === 'shaved')).toBe(true)
    const fourMinute = await maker.get('/api/workshop/blanks?format=four_minute&batch=t-26-01&pageSize=200')
    expect(fourMinute.body.rows.every((row: any) => row.format === 'four_minute' && row.batchCode === 'T-26-01')).toBe(true)
    const ascending = await maker.get('/api/workshop/blanks?sort=code_asc&pageSize=5&page=2')
    expect(ascending.body.rows).toHaveLength(5)
    expect(ascending.body.page).toBe(2)
    const codes = ascending.body.rows.map((row: any) => row.code)
    expect([...codes].sort()).toEqual(codes)
    const one = codes[0]
    const search = await maker.get(`/api/workshop/blanks?q=${one.slice(-4)}`)
    expect(search.body.rows.map((row: any) => row.code)).toContain(one)
    const bad = await maker.get('/api/workshop/blanks?state=melted')
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields).toHaveProperty('state')
  })

  it('shows the latest test of each blank\'s current surface in the list and exports the same rows as CSV', async () => {
    const list = await maker.get('/api/workshop/blanks?state=tested_pass&pageSize=200')
    expect(list.body.rows.length).toBeGreaterThan(0)
    expect(list.body.rows.every((row: any) => row.latestTest?.finalVerdict === 'pass')).toBe(true)
    const response = await fetch(url('/api/workshop/exports/blanks.csv?state=tested_pass'), { headers: { cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    expect(response.status).toBe(200)
    expect(response.headers.get('content-type')).toMatch(/text\/csv/)
    const lines = (await response.text()).trim().split('\r\n')
    expect(lines[0]).toMatch(/^code,batch,format,state,diameter_in/)
    expect(lines).toHaveLength(list.body.total + 1)
    // A negative level is a number, not a formula to defuse.
    expect(lines[1]).toMatch(/,"-\d+\.\d",/)
  })

  it('lists batches with yield = blanks passed ÷ blanks tested, and edits one', async () => {
    const batches = await maker.get('/api/workshop/batches')
    expect(batches.status).toBe(200)
    const mine = batches.body.find((b: any) => b.code === 'T-26-01')
    expect(mine.tested).toBeGreaterThan(0)
    expect(mine.yield).toBeCloseTo(mine.passed / mine.tested, 12)
    const taken = await maker.post('/api/workshop/batches', { code: 'T-26-01', formula: 'paraffin', pourDate: '2026-05-01', volumetricExpansionPerK: 0.0006 })
    expect(taken.status).toBe(409)
    expect(taken.body.data.fields).toHaveProperty('code')
    const badDate = await maker.post('/api/workshop/batches', { code: 'T-26-09', formula: 'paraffin', pourDate: '2026-13-01', volumetricExpansionPerK: 0.0006 })
    expect(badDate.status).toBe(400)
    expect(badDate.body.data.fields).toHaveProperty('pourDate')
    const edited = await maker.request(`/api/workshop/batches/${batchId}`, { method: 'PATCH', body: { notes: 'Poured on a cold morning.' } })
    expect(edited.status).toBe(200)
    expect(edited.body.notes).toBe('Poured on a cold morning.')
  })

  it('gives the label a Code 128 barcode of the code', async () => {
    const [code] = await newBlanks('four_minute')
    const label = await maker.get(`/api/workshop/blanks/${code}/label`)
    expect(label.status).toBe(200)
    expect(label.body).toMatchObject({ code, batchCode: 'T-26-01', format: 'four_minute' })
    expect(label.body.barcodeSvg).toMatch(/^<svg[^>]*viewBox/)
    expect(label.body.barcodeSvg).not.toMatch(/<script/i)
  })
})

// ——— the analyse route (issue 4) ———

/** An 8-bit PCM WAV: a valid header the engine refuses as too coarse. */
function eightBitWav(): Uint8Array {
  const samples = 22_050
  const bytes = new Uint8Array(44 + samples).fill(128)
  const view = new DataView(bytes.buffer)
  bytes.set([...'RIFF'].map(c => c.charCodeAt(0)), 0)
  view.setUint32(4, 36 + samples, true)
  bytes.set([...'WAVEfmt '].map(c => c.charCodeAt(0)), 8)
  view.setUint32(16, 16, true)
  view.setUint16(20, 1, true)
  view.setUint16(22, 1, true)
  view.setUint32(24, 22_050, true)
  view.setUint32(28, 22_050, true)
  view.setUint16(32, 1, true)
  view.setUint16(34, 8, true)
  bytes.set([...'data'].map(c => c.charCodeAt(0)), 36)
  view.setUint32(40, samples, true)
  return bytes
}

describe('POST /api/workshop/surface-tests/analyse', () => {
  const analyse = (file: { name: string, bytes: Uint8Array } | null, fields: Record<string, string> = {}, client: Client | null = maker) =>
    upload(client, '/api/workshop/surface-tests/analyse', file, fields)

  it('answers the figures of the engine for the same file', async () => {
    const bytes = makeSurfaceWav({ seconds: 8, sampleRate: 22_050, levelDbfs: -50, swellDepth: 0.2, rpm: 144, seed: 9 })
    const answer = await analyse({ name: 'take.wav', bytes }, { rpm: '144' })
    expect(answer.status).toBe(200)
    for (const key of ['durationS', 'sampleRate', 'channels', 'peakDbfs', 'rmsDbfs', 'aWeightedDbfs', 'crestDb', 'rotaryDb', 'clicksPerMinute', 'verdict', 'reasons', 'spectrum', 'envelope']) {
      expect(answer.body).toHaveProperty(key)
    }
    expect(answer.body).toEqual(JSON.parse(JSON.stringify(analyseSurfaceWav(bytes, { rpm: 144 }))))
    expect(answer.body.spectrum[0]).toEqual({ hz: expect.any(Number), db: expect.any(Number) })
    // The built server measures the spectrum on its second thread (server/audio/parallel.ts), and says so.
    expect(answer.headers.get('server-timing')).toMatch(/^analysis;dur=\d+(\.\d+)?;desc="2 threads"$/)
  })

  it('answers each file on its own when uploads follow one another (the shared buffer of one serves the next)', async () => {
    // A long take, then a shorter one that fits in its buffer, then a longer one than any before: each answer
    // is the engine's for that file alone, nothing left over from the one before.
    const takes = [
      makeSurfaceWav({ seconds: 9, sampleRate: 22_050, levelDbfs: -40, swellDepth: 0.1, rpm: 160, seed: 21 }),
      makeSurfaceWav({ seconds: 4, sampleRate: 22_050, levelDbfs: -62, swellDepth: 0.3, rpm: 160, seed: 22 }),
      makeSurfaceWav({ seconds: 4, sampleRate: 22_050, levelDbfs: -55, swellDepth: 0, rpm: 160, seed: 23 }),
      makeSurfaceWav({ seconds: 12, sampleRate: 22_050, levelDbfs: -48, swellDepth: 0.05, rpm: 160, seed: 24 }),
    ]
    for (const [index, bytes] of takes.entries()) {
      const answer = await analyse({ name: `take-${index}.wav`, bytes }, { rpm: '160' })
      expect(answer.status).toBe(200)
      expect(answer.body).toEqual(JSON.parse(JSON.stringify(analyseSurfaceWav(bytes, { rpm: 160 }))))
    }
  })

  it('refuses what it cannot read with the right 4xx and a message', async () => {
    const jpeg = await sharp({ create: { width: 8, height: 8, channels: 3, background: { r: 1, g: 2, b: 3 } } }).jpeg().toBuffer()
    const asJpeg = await analyse({ name: 'take.wav', bytes: jpeg })
    expect(asJpeg.status).toBe(415)
    expect(asJpeg.body.message).toMatch(/isn't a WAV file/)

    const whole = makeSurfaceWav({ seconds: 2, sampleRate: 22_050, seed: 5 })
    const truncated = await analyse({ name: 'cut.wav', bytes: whole.subarray(0, whole.length / 2) })
    expect(truncated.status).toBeGreaterThanOrEqual(400)
    expect(truncated.status).toBeLessThan(500)
    expect(truncated.body.message).toMatch(/cut short/)

    const eightBit = await analyse({ name: 'coarse.wav', bytes: eightBitWav() })
    expect(eightBit.status).toBe(415)
    expect(eightBit.body.message).toMatch(/8-bit/)

    const empty = await analyse({ name: 'empty.wav', bytes: new Uint8Array(0) })
    expect(empty.status).toBe(400)
    const noFile = await analyse(null)
    expect(noFile.status).toBe(400)
    expect(noFile.body.data.fields).toHaveProperty('file')

    const badRpm = await analyse({ name: 'take.wav', bytes: whole }, { rpm: 'fast' })
    expect(badRpm.status).toBe(400)
    expect(badRpm.body.data.fields).toHaveProperty('rpm')
  })

  it('answers 413 from a 61 MB declared size before the body arrives, and the next request is fine', async () => {
    const target = new URL(url('/api/workshop/surface-tests/analyse'))
    const status = await new Promise<number>((resolve, reject) => {
      const req = httpRequest({
        host: target.hostname,
        port: target.port,
        path: target.pathname,
        method: 'POST',
        headers: {
          'origin': target.origin,
          'cookie': [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; '),
          'content-type': 'multipart/form-data; boundary=x',
          'content-length': String(61 * 1024 * 1024),
        },
      }, (res) => {
        resolve(res.statusCode ?? 0)
        res.resume()
        req.destroy()
      })
      req.on('error', reject)
      // Only the first kilobyte is ever sent: an answer means the server did not wait for the rest.
      req.write(Buffer.alloc(1024))
      setTimeout(() => reject(new Error('no answer before the body was complete')), 10_000)
    })
    expect(status).toBe(413)
    const next = await analyse({ name: 'take.wav', bytes: quietWav() })
    expect(next.status).toBe(200)
    expect(next.body.verdict).toBe('pass')
  })
})

// ——— roles ———

describe('roles', () => {
  const routes: [method: string, path: string][] = [
    ['GET', '/api/workshop/batches'],
    ['POST', '/api/workshop/batches'],
    ['PATCH', '/api/workshop/batches/1'],
    ['GET', '/api/workshop/blanks'],
    ['POST', '/api/workshop/blanks'],
    ['GET', '/api/workshop/blanks/GW-26-0001'],
    ['PATCH', '/api/workshop/blanks/GW-26-0001'],
    ['GET', '/api/workshop/blanks/GW-26-0001/label'],
    ['POST', '/api/workshop/blanks/GW-26-0001/reaming'],
    ['POST', '/api/workshop/blanks/GW-26-0001/shaving'],
    ['POST', '/api/workshop/blanks/GW-26-0001/reshave'],
    ['POST', '/api/workshop/blanks/GW-26-0001/scrap'],
    ['POST', '/api/workshop/blanks/GW-26-0001/surface-tests'],
    ['PATCH', '/api/workshop/blanks/GW-26-0001/surface-tests/1'],
    ['POST', '/api/workshop/surface-tests/analyse'],
    ['GET', '/api/workshop/exports/blanks.csv'],
  ]

  it('answers 401 to nobody, 403 to a collector and a shipper, on every route of the register', async () => {
    for (const [method, path] of routes) {
      const body = method === 'GET' ? undefined : {}
      expect((await new Client().request(path, { method, body })).status, `${method} ${path} anonymous`).toBe(401)
      expect((await collector.request(path, { method, body })).status, `${method} ${path} collector`).toBe(403)
      expect((await shipper.request(path, { method, body })).status, `${method} ${path} shipper`).toBe(403)
    }
  })
})

// ——— the maker's surface-test limits (issue 4: "thresholds that the maker sets") ———

describe('surface-test limits: GET/PUT /api/workshop/settings/surface', () => {
  const path = '/api/workshop/settings/surface'
  const limits = (aWeighted: [number, number], rotary: [number, number], clicks: [number, number]) => ({
    aWeightedDbfs: { marginal: aWeighted[0], fail: aWeighted[1] },
    rotaryDb: { marginal: rotary[0], fail: rotary[1] },
    clicksPerMinute: { marginal: clicks[0], fail: clicks[1] },
  })

  it('refuses bad limits naming the field and keeps the old ones; judges new analyses by the saved ones', async () => {
    const before = await maker.get(path)
    expect(before.status).toBe(200)
    // The shop defaults, documented in server/audio/verdict.ts (common practice, no source).
    expect(before.body.defaults).toEqual({ ...limits([-50, -44], [15, 25], [6, 15]), coveragePercent: 90, passMaxAgeDays: 90 })
    try {
      const bad: [unknown, string][] = [
        [limits([-50, -44], [30, 20], [6, 15]), 'rotaryDb.fail'],
        [{ ...limits([-50, -44], [15, 25], [6, 15]), aWeightedDbfs: { marginal: 'loud', fail: -44 } }, 'aWeightedDbfs.marginal'],
        [limits([-130, -44], [15, 25], [6, 15]), 'aWeightedDbfs.marginal'],
        [limits([-50, -44], [15, 25], [6, -1]), 'clicksPerMinute.fail'],
      ]
      for (const [body, field] of bad) {
        const answer = await maker.put(path, body)
        expect(answer.status, JSON.stringify(answer.body)).toBe(400)
        expect(Object.keys(answer.body.data.fields)).toContain(field)
      }
      expect((await maker.put(path, { ...limits([-50, -44], [15, 25], [6, 15]), volume: 11 })).status).toBe(400)
      expect((await maker.get(path)).body.thresholds).toEqual(before.body.thresholds)

      const quiet = quietWav()
      expect((await upload(maker, '/api/workshop/surface-tests/analyse', { name: 'quiet.wav', bytes: quiet })).body.verdict).toBe('pass')
      const strict = await maker.put(path, limits([-90, -80], [15, 25], [6, 15]))
      expect(strict.status).toBe(200)
      expect(strict.body.thresholds.aWeightedDbfs).toEqual({ marginal: -90, fail: -80 })
      const judged = await upload(maker, '/api/workshop/surface-tests/analyse', { name: 'quiet.wav', bytes: quiet })
      expect(judged.body.verdict).toBe('fail')
      expect(judged.body.reasons.join(' ')).toContain('fail limit of −80.0 dBFS')
    }
    finally {
      expect((await maker.put(path, before.body.thresholds)).status).toBe(200)
    }
    expect((await maker.get(path)).body.thresholds).toEqual(before.body.thresholds)
  })
})

// ——— a batch's own figures in the heat-and-fit calculator (issue 6) ———

describe('heat and fit from a wax batch: GET /api/workshop/bench/heat-fit?batchId=', () => {
  it('uses the batch\'s own expansion coefficient and warns near its softening point', async () => {
    // Batch T-26-01 was poured with 750×10⁻⁶ per K volumetric and a 62 °C softening point (the maker's figures).
    const answer = await maker.get(`/api/workshop/bench/heat-fit?temperature=95&unit=F&bore=1.69&batchId=${batchId}`)
    expect(answer.status, JSON.stringify(answer.body)).toBe(200)
    expect(answer.body.wax).toMatchObject({ source: 'batch', batchId, code: 'T-26-01' })
    expect(answer.body.volumetricExpansionPerK).toBe(0.00075)
    // Linear ≈ volumetric ÷ 3 (engineering handbook tables): 250×10⁻⁶ per K, not the formulas' 270 or 197.
    expect(answer.body.linearExpansionPerK).toBeCloseTo(250e-6, 9)
    // 1.69 in × 250×10⁻⁶ × 20 °F × 5/9 = 0.004694 in (arithmetic).
    expect(answer.body.boreGrowthIn).toBeCloseTo(1.69 * 250e-6 * (100 / 9), 5)
    const byFormula = await maker.get('/api/workshop/bench/heat-fit?temperature=95&unit=F&bore=1.69&wax=stearic_acid')
    expect(byFormula.body.wax).toMatchObject({ source: 'formula', id: 'stearic_acid' })
    expect(byFormula.body.boreGrowthIn).not.toBeCloseTo(answer.body.boreGrowthIn, 5)
    // 95 °F is 35 °C: 27 °C below the softening point, no warning.
    expect(answer.body.softening).toEqual({ softeningPointC: 62, marginC: 27 })
    expect(answer.body.notes.join(' ')).not.toMatch(/softening/)

    const warm = await maker.get(`/api/workshop/bench/heat-fit?temperature=55&unit=C&batchId=${batchId}`)
    expect(warm.body.softening).toEqual({ softeningPointC: 62, marginC: 7 })
    // In the shop's unit (°F by default) with °C beside: a 7 °C step is 12.6 °F, 62 °C is 143.6 °F (NIST SP 811 B.8).
    expect(warm.body.notes[0]).toContain('within 12.6 °F (7 °C) of batch T-26-01\'s softening point of 143.6 °F (62 °C)')
    const hot = await maker.get(`/api/workshop/bench/heat-fit?temperature=65&unit=C&batchId=${batchId}`)
    expect(hot.body.notes[0]).toMatch(/at or past its softening point/)
  })

  it('refuses a batch with a formula, an unknown batch and a malformed id, naming batchId; only a maker may ask', async () => {
    const both = await maker.get(`/api/workshop/bench/heat-fit?temperature=95&wax=stearic_acid&batchId=${batchId}`)
    expect(both.status).toBe(400)
    expect(both.body.data.fields).toHaveProperty('batchId')
    const unknown = await maker.get('/api/workshop/bench/heat-fit?temperature=95&batchId=999999')
    expect(unknown.status).toBe(404)
    expect(unknown.body.data.fields).toHaveProperty('batchId')
    for (const bad of ['abc', '0', '1.5', '3000000000']) {
      const answer = await maker.get(`/api/workshop/bench/heat-fit?temperature=95&batchId=${bad}`)
      expect(answer.status, bad).toBe(400)
      expect(answer.body.data.fields).toHaveProperty('batchId')
    }
    expect((await collector.get(`/api/workshop/bench/heat-fit?temperature=95&batchId=${batchId}`)).status).toBe(403)
    expect((await shipper.get(`/api/workshop/bench/heat-fit?temperature=95&batchId=${batchId}`)).status).toBe(403)
    expect((await new Client().get(`/api/workshop/bench/heat-fit?temperature=95&batchId=${batchId}`)).status).toBe(401)
  })
})
