import { expect, test, type APIRequestContext, type Page } from '@playwright/test'
import sharp from 'sharp'
import { makeSurfaceWav } from '../../server/audio/synth'
import { noSeriousAxe, open } from './support/page'
import { demoAccount as account, signedInContext, signInThroughApi, site } from './support/signIn'

/*
 * The shipper at the bench, on a phone (390 × 844): a collector's order made to order is driven to
 * "ready to pack" through the maker's API, then checked for heat, packed with every checklist line
 * ticked, its slip fetched as a PDF, shipped with a tracking number; the collector sees it shipped and
 * gets the "on its way" mail once, says it arrived and reports a breakage with a photo, which the maker
 * answers. A second order held for heat cannot be packed and waits under "Held for heat".
 */

const shots = 'tests/browser/report'
const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const paymentFake = `http://127.0.0.1:${port + 1003}`
const inbox = `http://127.0.0.1:${port + 1002}`
const phone = { width: 390, height: 844 }
const desktop = { width: 1280, height: 900 }

const noSideways = async (page: Page) => expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)

/** The page's screenshot at phone and desktop width, each checked for sideways scrolling. */
async function shootBoth(page: Page, name: string) {
  for (const [size, viewport] of [['phone', phone], ['desktop', desktop]] as const) {
    await page.setViewportSize(viewport)
    await noSideways(page)
    await page.screenshot({ path: `${shots}/${name}-${size}.png`, fullPage: true })
  }
  await page.setViewportSize(phone)
}

/** API calls as a signed-in page would make them: the context's cookies and this site's Origin. */
async function api(request: APIRequestContext, method: 'GET' | 'POST', path: string, body?: Record<string, unknown>) {
  const response = await request.fetch(path, { method, headers: { origin: site }, data: body })
  expect(response.status(), `${method} ${path}: ${await response.text()}`).toBeLessThan(300)
  return await response.json()
}

/** A four-minute blank through the register: cast, reamed, shaved and a quiet play-through that passes. */
async function testedFourMinuteBlank(maker: APIRequestContext, seed: number): Promise<string> {
  const batch = await api(maker, 'POST', '/api/workshop/batches', { code: `DP-${Date.now()}-${seed}`, formula: 'stearic acid 75 / paraffin 15 / carnauba 10', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075 })
  const { codes } = await api(maker, 'POST', '/api/workshop/blanks', { batchId: batch.id, format: 'four_minute', count: 1, diameterIn: '2.206' })
  const code = codes[0] as string
  await api(maker, 'POST', `/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })
  await api(maker, 'POST', `/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })
  // A full play-through: a 4-minute surface plays 3.8 in × 200 ÷ 160 rpm = 285 s (shared/utils/cylinder.ts); a shorter take is incomplete.
  const wav = Buffer.from(makeSurfaceWav({ seconds: 285, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed }))
  const tested = await maker.post(`/api/workshop/blanks/${code}/surface-tests`, { headers: { origin: site }, multipart: { file: { name: `${code}.wav`, mimeType: 'audio/wav', buffer: wav } } })
  expect(tested.status(), await tested.text()).toBe(201)
  return code
}

/**
 * One made-to-order cylinder bought (by the signed-in buyer of `buyer`, or a guest) and paid on the
 * payment fake, then cut by the maker on a tested blank and sent to dispatch: the order is ready to pack.
 */
async function readyToPackOrder(maker: APIRequestContext, buyer: APIRequestContext, email: string, seed: number): Promise<string> {
  const blankCode = await testedFourMinuteBlank(maker, seed)
  const { recorders } = await api(maker, 'GET', '/api/workshop/recorders')
  const recorder = recorders.find((candidate: { inService: boolean }) => candidate.inService)
    ?? await api(maker, 'POST', '/api/workshop/recorders', { name: 'Dispatch Lathe', stylus: 'Sapphire, 0.003 in' })
  const checkout = await api(buyer, 'POST', '/api/checkout', {
    items: [{ slug: 'moth-and-mandrel-waltz', qty: 1 }],
    email,
    shippingAddress: { name: 'Tamsin Orrell', line1: '4 Wick Lane', city: 'Lowmere', postalCode: 'LM3 1WL', region: 'OR', country: 'US' },
    zone: 'domestic',
  })
  const paid = await buyer.post(`${paymentFake}/_fake/sessions/${String(checkout.url).split('/').pop()}/complete?wait=true`, { data: {} })
  expect(paid.ok()).toBe(true)
  const orderNumber = checkout.orderNumber as string
  let ticketId = 0
  await expect.poll(async () => {
    ticketId = (await api(maker, 'GET', `/api/workshop/tickets?q=${orderNumber}`)).tickets[0]?.id ?? 0
    return ticketId
  }).toBeGreaterThan(0)
  await api(maker, 'POST', `/api/workshop/tickets/${ticketId}/assign`, { blankCode })
  await api(maker, 'POST', `/api/workshop/tickets/${ticketId}/cut`, { recorderId: recorder.id })
  await api(maker, 'POST', `/api/workshop/tickets/${ticketId}/stage`, { to: 'to_dispatch', note: '' })
  await expect.poll(async () => (await api(maker, 'GET', `/api/orders/${orderNumber}`)).status).toBe('ready_to_pack')
  return orderNumber
}

/** The shipper signs in through the API in the page's own context (the sign-in form has its own test). */
const signInAsShipper = (page: Page) => signInThroughApi(page, 'shipper', '/dispatch')

/**
 * The heat check form filled in `unit`: the field's label names the unit once the page has taken the
 * choice, and a page still waking up resets what was typed, so it is filled again until all of it holds.
 */
async function heatCheck(page: Page, high: string, days: string, unit: 'C' | 'F' = 'C') {
  await expect(async () => {
    await page.getByLabel('Unit').selectOption(unit)
    await page.getByLabel(`Forecast high (°${unit})`).fill(high, { timeout: 1000 })
    await page.getByLabel('Days in transit').fill(days)
    await expect(page.getByLabel(`Forecast high (°${unit})`)).toHaveValue(high, { timeout: 500 })
    await expect(page.getByLabel('Days in transit')).toHaveValue(days, { timeout: 500 })
  }).toPass({ timeout: 15_000 })
  await page.getByRole('button', { name: 'Check the heat' }).click()
}

const subjectsTo = async (email: string) => (await (await fetch(`${inbox}/api/messages?to=${encodeURIComponent(email)}`)).json() as { subject: string }[]).map(m => m.subject)

test('the shipper packs and ships a collector\'s order from a phone; the collector sees it shipped, once mailed, and reports a breakage', async ({ page, browser }) => {
  test.setTimeout(180_000)
  const pageErrors: string[] = []
  page.on('pageerror', error => pageErrors.push(error.message))
  const maker = await signedInContext(browser, 'maker')
  const collector = await signedInContext(browser, 'collector')
  const email = account('collector').email
  const orderNumber = await readyToPackOrder(maker.request, collector.request, email, 301)

  await page.setViewportSize(phone)
  await signInAsShipper(page)
  await page.goto('/dispatch')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Dispatch')
  const card = page.getByTestId(`dispatch-${orderNumber}`)
  await expect(card).toContainText('Moth and Mandrel Waltz')
  await expect(card).toContainText('Lowmere')
  await expect(card).not.toContainText('$')
  await noSeriousAxe(page)
  await shootBoth(page, 'dispatch-queue')

  await card.getByRole('link', { name: orderNumber }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Order ${orderNumber}`)
  await expect(page.getByTestId('dispatch-caution')).toContainText(/lift with your legs/i)
  await expect(page.getByTestId('dispatch-caution').getByRole('link', { name: 'Shipping and heat guide' })).toHaveAttribute('href', '/guides/shipping-and-heat')
  await expect(page.getByTestId('packing-figures')).toContainText('Billable weight')
  // The demo shop reads in pounds and ounces, with the metric figure beside.
  await expect(page.getByTestId('packing-figures')).toContainText(/\d oz \([\d.]+ k?g\)/)
  await noSeriousAxe(page)

  // A box from the shop's list is packed again by the server; one too small says why and keeps the last packing.
  await page.getByLabel('Outer box', { exact: true }).selectOption('box-4x4x6')
  await expect(page.getByTestId('box-error')).toContainText('does not take')
  await expect(page.getByRole('button', { name: 'Mark packed' })).toBeDisabled()
  await page.getByLabel('Outer box', { exact: true }).selectOption('')
  await expect(page.getByTestId('box-error')).toHaveCount(0)

  // 18 °C for two days on the road: cool enough.
  await heatCheck(page, '18', '2')
  await expect(page.getByTestId('heat-answer')).toContainText('OK to ship')

  // Every checklist line must be ticked: pressing early names what is missing and packs nothing.
  await page.getByRole('button', { name: 'Mark packed' }).click()
  await expect(page.getByTestId('checklist-error')).toContainText('Still to tick')
  await expect(page.getByTestId('dispatch-status')).toHaveText('Ready to pack')
  const boxes = page.getByRole('group', { name: /Checklist/ }).getByRole('checkbox')
  expect(await boxes.count()).toBeGreaterThanOrEqual(4)
  for (const box of await boxes.all()) await box.check()
  // Typed with its units; the server keeps whole grams: 3 lb 3 oz = 51 × 28.3495 g = 1445.8 g (the avoirdupois ounce).
  await page.getByLabel('Weighed (lb)').fill('3 lb 3 oz')
  await expect(page.getByText('Read as 3 lb 3 oz (1.45 kg)')).toBeVisible()
  const packed = page.waitForResponse(response => response.url().endsWith(`/api/dispatch/${orderNumber}/pack`))
  await page.getByRole('button', { name: 'Mark packed' }).click()
  expect((await (await packed).json()).weighedG).toBe(1446)
  await expect(page.getByTestId('dispatch-status')).toHaveText('Packed')

  // The slip opens in a new tab as a PDF.
  const slip = page.getByRole('link', { name: /Print slip \(A4\)/ })
  await expect(slip).toHaveAttribute('target', '_blank')
  const pdf = await page.request.get((await slip.getAttribute('href'))!)
  expect(pdf.status()).toBe(200)
  expect(pdf.headers()['content-type']).toContain('application/pdf')
  expect((await pdf.body()).subarray(0, 4).toString('latin1')).toBe('%PDF')

  // A postal item number with a wrong check digit is refused by name (UPU S10: 12345678 takes check digit 5).
  await page.getByLabel('Carrier', { exact: true }).selectOption('post')
  await page.getByLabel('Tracking number').fill('RR123456780GB')
  await page.getByRole('button', { name: 'Mark shipped' }).click()
  await expect(page.getByText(/check digit should be 5/)).toBeVisible()
  await page.getByLabel('Tracking number').fill('RR123456785GB')
  await page.getByRole('button', { name: 'Mark shipped' }).click()
  await expect(page.getByTestId('shipment-status')).toContainText('Shipped')
  await expect(page.getByTestId('shipment-status')).toContainText('RR123456785GB')
  await expect(page.getByRole('button', { name: 'Mark delivered' })).toBeVisible()
  await noSeriousAxe(page)
  await shootBoth(page, 'dispatch-order')

  // Shipped, found by its tracking number.
  await open(page, '/dispatch?tab=shipped')
  await page.getByLabel('Order or tracking number').fill('RR123456785')
  await page.getByRole('button', { name: 'Search' }).click()
  await expect(page).toHaveURL(/q=RR123456785/)
  await expect(page.getByTestId(`dispatch-${orderNumber}`)).toBeVisible()
  await noSeriousAxe(page)

  // The collector's order page: shipped with the tracking number; the mail went exactly once.
  const customer = await collector.newPage()
  await customer.setViewportSize(phone)
  await open(customer, `/account/orders/${orderNumber}`)
  await expect(customer.getByTestId('order-shipment')).toContainText('Shipped')
  await expect(customer.getByTestId('tracking-number')).toHaveText('RR123456785GB')
  await noSeriousAxe(customer)
  await shootBoth(customer, 'order-shipped')
  const onItsWay = `Order ${orderNumber} is on its way`
  await expect.poll(async () => (await subjectsTo(email)).filter(subject => subject === onItsWay).length, { timeout: 15_000 }).toBe(1)
  const again = await page.request.post(`/api/dispatch/${orderNumber}/ship`, { headers: { origin: site }, data: { carrier: 'post', trackingNumber: 'RR123456785GB' } })
  expect(again.status()).toBe(409)
  await page.waitForTimeout(1500)
  expect((await subjectsTo(email)).filter(subject => subject === onItsWay)).toHaveLength(1)

  // It arrived; then a breakage report with a photo, which the maker answers.
  await customer.getByRole('button', { name: 'It arrived' }).click()
  await expect(customer.getByTestId('order-shipment')).toContainText('Delivered')
  await expect(customer.getByText(/Reports are taken until/)).toBeVisible()
  await customer.getByLabel('What happened').fill('The cylinder came out of its tube in two pieces; the outer box was crushed at one corner.')
  const photo = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#8a5a34' } }).png().toBuffer()
  await customer.getByLabel(/^Photos/).setInputFiles({ name: 'broken.png', mimeType: 'image/png', buffer: photo })
  await customer.getByRole('button', { name: 'Send the report' }).click()
  await expect(customer.getByTestId('order-claim')).toContainText('Being looked at')
  await expect(customer.getByTestId('order-claim').getByRole('img')).toHaveCount(1)
  await expect(customer.getByLabel('What happened')).toHaveValue('')
  await noSeriousAxe(customer)
  await customer.screenshot({ path: `${shots}/order-claim-phone.png`, fullPage: true })

  const workshop = await maker.newPage()
  await workshop.setViewportSize(desktop)
  await open(workshop, '/workshop')
  await workshop.getByRole('link', { name: /^Claims/ }).click()
  await expect(workshop.getByRole('heading', { level: 1 })).toHaveText('Breakage claims')
  const claim = workshop.locator('article').filter({ hasText: orderNumber })
  await expect(claim).toContainText('two pieces')
  await expect(claim.getByRole('link', { name: /Photo 1 of 1/ })).toHaveAttribute('target', '_blank')
  await noSeriousAxe(workshop)
  await workshop.screenshot({ path: `${shots}/workshop-claims-desktop.png`, fullPage: true })
  await claim.getByLabel('Send a replacement').check()
  await claim.getByLabel('Note to the customer').fill('A new cylinder is being cut for you.')
  await claim.getByRole('button', { name: 'Send a replacement' }).click()
  await expect(claim).toContainText('Replaced')
  await expect(claim).toContainText('A new cylinder is being cut for you.')
  await customer.reload()
  await expect(customer.getByTestId('order-claim')).toContainText('A new cylinder is being cut for you.')
  expect(pageErrors).toEqual([])
  await maker.close()
  await collector.close()
})

test('an order held for heat cannot be packed and waits under "Held for heat"', async ({ page, browser }) => {
  test.setTimeout(120_000)
  const maker = await signedInContext(browser, 'maker')
  const orderNumber = await readyToPackOrder(maker.request, maker.request, `guest-${Date.now()}@collectors.test`, 302)
  await maker.close()

  await page.setViewportSize(phone)
  await signInAsShipper(page)
  await page.goto(`/dispatch/${orderNumber}`)
  // 38 °C and three days on the road: too hot for wax.
  await heatCheck(page, '38', '3')
  await expect(page.getByTestId('heat-answer')).toContainText('Hold the parcel')
  await expect(page.getByTestId('heat-answer')).toContainText('Next day to ship')
  // The day to look again with its weekday, in the shop's locale (en-US by default): "Mon, Dec 7".
  await expect(page.getByTestId('heat-answer')).toContainText(/Next day to ship: (Mon|Tue|Wed|Thu|Fri|Sat|Sun), [A-Z][a-z]{2} \d{1,2}/)
  await expect(page.getByTestId('dispatch-status')).toHaveText('Held for heat')
  for (const box of await page.getByRole('group', { name: /Checklist/ }).getByRole('checkbox').all()) await box.check()
  await expect(page.getByRole('button', { name: 'Mark packed' })).toBeDisabled()
  await noSeriousAxe(page)
  await page.screenshot({ path: `${shots}/dispatch-held-phone.png`, fullPage: true })

  // The server refuses too, whatever the page shows.
  const detail = await api(page.request, 'GET', `/api/dispatch/${orderNumber}`)
  const refused = await page.request.post(`/api/dispatch/${orderNumber}/pack`, { headers: { origin: site }, data: { checklist: detail.checklist.map((item: { id: string }) => item.id) } })
  expect(refused.status()).toBe(409)

  await open(page, '/dispatch')
  await expect(page.getByTestId(`dispatch-${orderNumber}`)).toHaveCount(0)
  await page.getByTestId('tab-held').click()
  await expect(page).toHaveURL(/tab=held/)
  const held = page.getByTestId(`dispatch-${orderNumber}`)
  await expect(held).toContainText('Hold the parcel')
  await expect(held).toContainText(/Look again: (Mon|Tue|Wed|Thu|Fri|Sat|Sun), [A-Z][a-z]{2} \d{1,2}/)
  await noSeriousAxe(page)
})

test('the shop\'s units: the same heat check and weights read in °F and lb, then in °C and kg', async ({ page, browser }) => {
  test.setTimeout(150_000)
  const maker = await signedInContext(browser, 'maker')
  const before = await api(maker.request, 'GET', '/api/shop/units')
  const setUnits = async (units: Record<string, string>) => {
    const response = await maker.request.fetch('/api/workshop/settings/units', { method: 'PUT', headers: { origin: site }, data: units })
    expect(response.status(), await response.text()).toBe(200)
  }
  try {
    const orderNumber = await readyToPackOrder(maker.request, maker.request, `guest-${Date.now()}@collectors.test`, 303)
    await setUnits({ temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' })
    await page.setViewportSize(phone)
    await signInAsShipper(page)
    await page.goto(`/dispatch/${orderNumber}`)
    const figures = page.getByTestId('packing-figures')
    const billable = figures.locator('dd').last()

    // 95 °F typed in a °F shop: the unit is the shop's without choosing it.
    await expect(page.getByLabel('Unit')).toHaveValue('F')
    await heatCheck(page, '95', '3', 'F')
    const answer = page.getByTestId('heat-answer')
    await expect(answer).toContainText('The shop\'s limits')
    const verdictInF = await answer.locator('p').first().textContent()
    await expect(answer).toContainText(/caution from [\d.]+ °F \([\d.]+ °C\)/)
    await expect(billable).toHaveText(/^(\d+ lb )?[\d.]+ oz \([\d.]+ k?g\)$/)
    const [, imperial, metric] = /^(.+ oz) \((.+)\)$/.exec((await billable.textContent())!.trim())!
    await page.reload()
    await expect(page.getByText('95 °F (35 °C) forecast')).toBeVisible()
    await noSeriousAxe(page)
    await shootBoth(page, 'dispatch-units-f-lb')

    // The same figures in a °C / kg / mm shop: 35 °C is 95 °F ((95 − 32) × 5/9), so the same verdict.
    await setUnits({ temperature: 'C', length: 'mm', weight: 'kg', locale: 'en-GB' })
    await page.reload()
    await expect(page.getByText('35 °C (95 °F) forecast')).toBeVisible()
    await expect(billable).toHaveText(`${metric} (${imperial})`)
    await expect(figures).toContainText(/\d+ × \d+ × \d+ mm/)
    await expect(page.getByLabel('Unit')).toHaveValue('C')
    await heatCheck(page, '35', '3', 'C')
    await expect(answer).toContainText(/caution from [\d.]+ °C \([\d.]+ °F\)/)
    await expect(answer.locator('p').first()).toHaveText(verdictInF!)
    // A bare figure is in the shop's unit: 1.45 in a kg shop is 1.45 kg.
    await page.getByLabel('Weighed (kg)').fill('1.45')
    await expect(page.getByText('Read as 1.45 kg (3 lb 3.1 oz)')).toBeVisible()
    await noSeriousAxe(page)
    await shootBoth(page, 'dispatch-units-c-kg')
  }
  finally {
    await setUnits(before)
    await maker.close()
  }
})
