import { execFileSync } from 'node:child_process'
import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import { beforeAll, describe, expect, it } from 'vitest'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import type { Client } from './harness'
import { signedIn, useTestServer, waitFor } from './harness'

/*
 * A blank product counted from the register: its stock is the register's free blanks of its format and
 * wax whose current surface passed a fresh test, less the units open orders promise; packing ties one
 * specific blank to each unit (its code on the slip, read back with poppler's pdftotext, and on the
 * order). The pool is a wax formula of this test's own, so the demo's blanks never count.
 */

const env = await useTestServer({ NUXT_UPLOADS_DIR: mkdtempSync(join(tmpdir(), 'gw-blank-stock-uploads-')) })
const payments = env.payments
const account = (role: string) => demoAccounts.find(a => a.role === role)!
const work = mkdtempSync(join(tmpdir(), 'gw-blank-stock-'))
let maker: Client
let shipper: Client
let collector: Client
let batchId: number
let batchCode: string
let counter = 0
const address = { name: 'Odile Marrow', line1: '9 Chandlers Row', city: 'Lowmere', postalCode: 'LM4 2CR', region: 'OR', country: 'US' }
const fullChecklist = ['tubes', 'cushioning', 'double_box', 'slip', 'marks']
// Short synthetic takes of steady quiet hiss (server/audio/synth.ts); coveragePercent is lowered below.
const quiet = () => makeSurfaceWav({ seconds: 8, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed: 61 })

async function fake(path: string, body?: unknown) {
  const response = await fetch(`${payments.url}${path}`, { method: body === undefined ? 'GET' : 'POST', headers: { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) })
  return await response.json() as any
}

async function uploadTake(code: string) {
  const form = new FormData()
  form.append('file', new Blob([quiet()], { type: 'audio/wav' }), 'take.wav')
  const target = url(`/api/workshop/blanks/${code}/surface-tests`)
  const headers = { origin: new URL(target).origin, accept: 'application/json', cookie: [...maker.cookies].map(([k, v]) => `${k}=${v}`).join('; ') }
  const response = await fetch(target, { method: 'POST', body: form, headers })
  return { status: response.status, body: await response.json() as any }
}

async function shavedBlank(batch = batchId): Promise<string> {
  const created = await maker.post('/api/workshop/blanks', { batchId: batch, format: 'two_minute', count: 1, diameterIn: '2.206' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const code = created.body.codes[0] as string
  expect((await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })).status).toBe(201)
  expect((await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })).status).toBe(201)
  return code
}

async function passedBlank(batch = batchId): Promise<string> {
  const code = await shavedBlank(batch)
  const tested = await uploadTake(code)
  expect(tested.status, JSON.stringify(tested.body)).toBe(201)
  expect(tested.body.finalVerdict).toBe('pass')
  return code
}

const blankOf = async (code: string) => (await maker.get(`/api/workshop/blanks/${code}`)).body.blank as { state: string, location: string }

/** The register's own view: this batch's blanks that passed a test that is not stale (the register's table). */
async function registerPassed(): Promise<string[]> {
  const listed = await maker.get(`/api/workshop/blanks?batch=${batchCode}&state=tested_pass&pageSize=100`)
  expect(listed.status).toBe(200)
  return (listed.body.rows as { code: string, staleTest: boolean, latestTest: { finalVerdict: string } | null }[])
    .filter(row => !row.staleTest && row.latestTest?.finalVerdict === 'pass').map(row => row.code)
}

async function productForm(id: number) {
  const answer = await maker.get(`/api/workshop/products/${id}`)
  expect(answer.status).toBe(200)
  return answer.body as { product: { stock: number, stockSource: string }, blankStock: { source: string, register: number, free: number, promised: number, difference: number } }
}

async function newProduct(stockSource?: 'register' | 'manual', stock = 0, waxFormulaId = 'beeswax_test') {
  const answer = await maker.post('/api/workshop/products', {
    slug: `register-blank-${Date.now()}-${++counter}`, title: `Beeswax practice blank ${counter}`, kind: 'blank', format: 'two_minute',
    material: 'beeswax blend', priceMinor: 1500, stock, waxFormulaId, ...(stockSource ? { stockSource } : {}),
  })
  expect(answer.status, JSON.stringify(answer.body)).toBe(201)
  return answer.body as { id: number, slug: string, stock: number, stockSource: string }
}

/** Checks out and pays; the order of stock items only goes straight to packing. */
async function paidOrder(slug: string, qty = 1): Promise<string> {
  const created = await collector.post('/api/checkout', { items: [{ slug, qty }], email: `blank-stock-${++counter}@collectors.test`, shippingAddress: address, zone: 'domestic' })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  await fake(`/_fake/sessions/${created.body.url.split('/').pop()}/complete?wait=true`, {})
  await waitFor(async () => (await maker.get(`/api/workshop/orders/${created.body.orderNumber}`)).body.status === 'ready_to_pack', 10_000, 'the order ready to pack')
  return created.body.orderNumber as string
}

beforeAll(async () => {
  maker = await signedIn(account('maker').email, account('maker').password)
  shipper = await signedIn(account('shipper').email, account('shipper').password)
  collector = await signedIn(account('collector').email, account('collector').password)
  // Short takes count as whole play-throughs here; the coverage rule has its own tests (workshop-truth.test.ts).
  expect((await maker.put('/api/workshop/settings/surface', { coveragePercent: 1 })).status).toBe(200)
  // A wax formula of this test's own, after the shop's others (the first stays the shop's default).
  const engine = await maker.get('/api/workshop/settings/engine')
  const figures = engine.body.settings
  figures.fit.waxFormulas = [...figures.fit.waxFormulas, { id: 'beeswax_test', label: 'Beeswax test', volumetricExpansionPerK: 700e-6 }, { id: 'beeswax_test_b', label: 'Beeswax test B', volumetricExpansionPerK: 720e-6 }]
  const saved = await maker.put('/api/workshop/settings/engine', figures)
  expect(saved.status, JSON.stringify(saved.body)).toBe(200)
  batchCode = `BS-26-${Date.now() % 10_000}`
  const batch = await maker.post('/api/workshop/batches', { code: batchCode, formula: 'beeswax 60 / stearic acid 40', pourDate: '2026-09-01', volumetricExpansionPerK: 0.0007, waxFormulaId: 'beeswax_test' })
  expect(batch.status, JSON.stringify(batch.body)).toBe(201)
  batchId = batch.body.id
})

describe('a blank product counted from the register', () => {
  let product: { id: number, slug: string }
  let spare: string
  let orderNumber: string
  let packedCode: string

  it('starts at the register\'s count (none yet), whatever stock was sent, and follows each test that passes', async () => {
    product = await newProduct('register', 30)
    expect((await productForm(product.id)).product).toMatchObject({ stock: 0, stockSource: 'register' })
    const first = await passedBlank()
    expect(await registerPassed()).toEqual([first])
    expect((await productForm(product.id)).product.stock).toBe(1)
    spare = await passedBlank()
    expect((await registerPassed()).sort()).toEqual([first, spare].sort())
    expect((await productForm(product.id)).product.stock).toBe(2)
    // A blank shaved but not yet tested does not count.
    await shavedBlank()
    expect((await productForm(product.id)).product.stock).toBe(2)
    // Typing a count is refused while the register counts.
    const typed = await maker.request(`/api/workshop/products/${product.id}`, { method: 'PATCH', body: { stock: 9 } })
    expect(typed.status).toBe(400)
    expect(typed.body.data.fields.stock).toMatch(/register/)
  })

  it('a sale promises a unit; packing ties one specific passed blank (reserved, at the packing table), and the stock still equals the register\'s count', async () => {
    orderNumber = await paidOrder(product.slug)
    // Two free passed blanks, one promised to the open order.
    expect((await productForm(product.id)).blankStock).toMatchObject({ source: 'register', free: 2, promised: 1, register: 1 })
    expect((await productForm(product.id)).product.stock).toBe(1)

    const packed = await shipper.post(`/api/dispatch/${orderNumber}/pack`, { checklist: fullChecklist })
    expect(packed.status, JSON.stringify(packed.body)).toBe(200)
    expect(packed.body.blanks).toHaveLength(1)
    packedCode = packed.body.blanks[0]
    expect([...await registerPassed()]).not.toContain(packedCode)
    expect(await blankOf(packedCode)).toMatchObject({ state: 'reserved', location: 'packing table' })
    // The register now has one free passed blank and no order promises any: stock 1.
    expect((await registerPassed()).length).toBe(1)
    expect((await productForm(product.id)).product.stock).toBe(1)
    expect((await productForm(product.id)).blankStock).toMatchObject({ free: 1, promised: 0 })
  })

  it('the blank\'s code is on the packing slip and on the order; shipping ships the blank', async () => {
    const slip = await fetch(url(`/api/dispatch/${orderNumber}/slip.pdf?paper=a4`), { headers: { cookie: [...shipper.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    expect(slip.status).toBe(200)
    const file = join(work, 'slip.pdf')
    writeFileSync(file, Buffer.from(await slip.arrayBuffer()))
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ')
    expect(text).toContain(packedCode)
    expect(text).toMatch(/Beeswax practice blank/)

    const order = await collector.get(`/api/orders/${orderNumber}`)
    expect(order.status).toBe(200)
    expect(order.body.items[0].blankCodes).toEqual([packedCode])
    const workshop = await maker.get(`/api/workshop/orders/${orderNumber}`)
    expect(workshop.body.items[0].blankCodes).toEqual([packedCode])

    const shipped = await shipper.post(`/api/dispatch/${orderNumber}/ship`, { carrier: 'post', trackingNumber: 'RR473124829GB' })
    expect(shipped.status, JSON.stringify(shipped.body)).toBe(200)
    expect(await blankOf(packedCode)).toMatchObject({ state: 'shipped', location: '' })
  })

  it('scrapping the last free blank takes the stock to the register\'s count: none', async () => {
    expect(await registerPassed()).toEqual([spare])
    expect((await maker.post(`/api/workshop/blanks/${spare}/scrap`, { reason: 'Cracked on the shelf.' })).status).toBe(200)
    expect(await registerPassed()).toEqual([])
    expect((await productForm(product.id)).product.stock).toBe(0)
    expect(await blankOf(spare)).toMatchObject({ state: 'scrapped', location: 'scrap bin' })
  })

  it('an unpaid order given up gives its unit back to the register\'s count', async () => {
    const code = await passedBlank()
    expect((await productForm(product.id)).product.stock).toBe(1)
    const created = await collector.post('/api/checkout', { items: [{ slug: product.slug, qty: 1 }], email: `blank-stock-${++counter}@collectors.test`, shippingAddress: address, zone: 'domestic' })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect((await productForm(product.id)).product.stock).toBe(0)
    // Sold out meanwhile: another checkout is refused.
    const second = await collector.post('/api/checkout', { items: [{ slug: product.slug, qty: 1 }], email: `blank-stock-${++counter}@collectors.test`, shippingAddress: address, zone: 'domestic' })
    expect(second.status).toBe(409)
    const cancelled = await maker.post(`/api/workshop/orders/${created.body.orderNumber}/cancel`)
    expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200)
    expect((await productForm(product.id)).product.stock).toBe(1)
    expect(await registerPassed()).toEqual([code])
  })

  it('packing with no free passed blank of the format and wax is a 409 naming the product and the wax, and ties nothing', async () => {
    const [code] = await registerPassed()
    const number = await paidOrder(product.slug)
    expect((await maker.post(`/api/workshop/blanks/${code}/scrap`, { reason: 'Dropped.' })).status).toBe(200)
    expect((await productForm(product.id)).product.stock).toBe(0)
    const refused = await shipper.post(`/api/dispatch/${number}/pack`, { checklist: fullChecklist })
    expect(refused.status).toBe(409)
    expect(refused.body.message).toMatch(/Beeswax test wax/)
    expect(refused.body.message).toMatch(/2-minute/)
    expect(refused.body.message).toContain('Beeswax practice blank')
    expect((await maker.get(`/api/workshop/orders/${number}`)).body.status).toBe('ready_to_pack')
    // A blank tested now lets it go.
    const fresh = await passedBlank()
    const packed = await shipper.post(`/api/dispatch/${number}/pack`, { checklist: fullChecklist })
    expect(packed.status, JSON.stringify(packed.body)).toBe(200)
    expect(packed.body.blanks).toEqual([fresh])
  })

  it('a blank packed for an order still to ship cannot be scrapped or worked on: 409 naming the order, and it stays reserved for the parcel', async () => {
    const code = await passedBlank()
    const number = await paidOrder(product.slug)
    const packed = await shipper.post(`/api/dispatch/${number}/pack`, { checklist: fullChecklist })
    expect(packed.status, JSON.stringify(packed.body)).toBe(200)
    expect(packed.body.blanks).toEqual([code])
    const scrapped = await maker.post(`/api/workshop/blanks/${code}/scrap`, { reason: 'Looks chipped.' })
    expect(scrapped.status).toBe(409)
    expect(scrapped.body.message).toContain(`order ${number}`)
    const refit = await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '7/16', overhangAfterIn: '1/2', reamings: 1, roomTemperatureF: 74, refit: true })
    expect(refit.status).toBe(409)
    expect(await blankOf(code)).toMatchObject({ state: 'reserved', location: 'packing table' })
    expect((await maker.get(`/api/workshop/orders/${number}`)).body.items[0].blankCodes).toEqual([code])
  })

  it('a manual count keeps what the maker typed, through register changes, and shows its difference to the register', async () => {
    const manual = await newProduct('manual', 7)
    expect(manual.stock).toBe(7)
    await passedBlank()
    const form = await productForm(manual.id)
    expect(form.product).toMatchObject({ stock: 7, stockSource: 'manual' })
    expect(form.blankStock.register).toBe((await registerPassed()).length)
    expect(form.blankStock.difference).toBe(7 - form.blankStock.register)
    // Switched to the register, it takes the register's count at once.
    const switched = await maker.request(`/api/workshop/products/${manual.id}`, { method: 'PATCH', body: { stockSource: 'register' } })
    expect(switched.status, JSON.stringify(switched.body)).toBe(200)
    expect(switched.body.stock).toBe(form.blankStock.register)
  })
})

describe('a batch\'s wax formula, changed, moves its blanks to the other pool at once', () => {
  it('the catalogue\'s stock of both formulas changes on the next request, not at the next sweep', async () => {
    const productA = await newProduct('register')
    const productB = await newProduct('register', 0, 'beeswax_test_b')
    const batch = await maker.post('/api/workshop/batches', { code: `BS-26-B${Date.now() % 10_000}`, formula: 'beeswax 55 / stearic acid 45', pourDate: '2026-09-02', volumetricExpansionPerK: 0.00072, waxFormulaId: 'beeswax_test_b' })
    expect(batch.status, JSON.stringify(batch.body)).toBe(201)
    await passedBlank(batch.body.id)
    const before = (await productForm(productA.id)).product.stock
    expect((await productForm(productB.id)).product.stock).toBe(1)
    const changed = await maker.request(`/api/workshop/batches/${batch.body.id}`, { method: 'PATCH', body: { waxFormulaId: 'beeswax_test' } })
    expect(changed.status, JSON.stringify(changed.body)).toBe(200)
    expect((await productForm(productA.id)).product.stock).toBe(before + 1)
    expect((await productForm(productB.id)).product.stock).toBe(0)
  })
})

describe('a blank\'s location follows its state', () => {
  it('each move takes it to the usual place of its new state; a place the maker types stays until the next change of state', async () => {
    const created = await maker.post('/api/workshop/blanks', { batchId, format: 'two_minute', count: 1, diameterIn: '2.206' })
    const code = created.body.codes[0] as string
    expect((await blankOf(code)).location).toBe('curing rack')
    await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })
    expect(await blankOf(code)).toMatchObject({ state: 'reamed', location: 'bench' })
    expect((await maker.request(`/api/workshop/blanks/${code}`, { method: 'PATCH', body: { location: 'Drawer 3' } })).status).toBe(200)
    // A second reaming keeps the state (reamed): the typed place stays.
    await maker.post(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '7/16', overhangAfterIn: '1/2', reamings: 1, roomTemperatureF: 74 })
    expect(await blankOf(code)).toMatchObject({ state: 'reamed', location: 'Drawer 3' })
    await maker.post(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })
    expect(await blankOf(code)).toMatchObject({ state: 'shaved', location: 'bench' })
    expect((await uploadTake(code)).status).toBe(201)
    expect(await blankOf(code)).toMatchObject({ state: 'tested_pass', location: 'ready shelf' })
  })
})
