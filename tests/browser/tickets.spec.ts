import { expect, test, type APIRequestContext } from '@playwright/test'
import { makeSurfaceWav } from '../../server/audio/synth'
import { noSeriousAxe, open } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'
const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const site = `http://localhost:${port}`
const paymentFake = `http://127.0.0.1:${port + 1003}`

/** The maker's API calls as the page would make them: its cookies and this site's Origin. */
async function api(request: APIRequestContext, method: 'GET' | 'POST', path: string, body?: Record<string, unknown>) {
  const response = await request.fetch(path, { method, headers: { origin: site }, data: body })
  expect(response.status(), `${method} ${path}: ${await response.text()}`).toBeLessThan(300)
  return await response.json()
}

/** A four-minute blank through the register: cast, reamed, shaved and a quiet play-through that passes. */
async function testedFourMinuteBlank(request: APIRequestContext): Promise<string> {
  const batch = await api(request, 'POST', '/api/workshop/batches', { code: `BT-${Date.now()}`, formula: 'stearic acid 75 / paraffin 15 / carnauba 10', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075 })
  const { codes } = await api(request, 'POST', '/api/workshop/blanks', { batchId: batch.id, format: 'four_minute', count: 1, diameterIn: '2.206' })
  const code = codes[0] as string
  await api(request, 'POST', `/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })
  await api(request, 'POST', `/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })
  // A full play-through: a 4-minute surface plays 3.8 in × 200 ÷ 160 rpm = 285 s (shared/utils/cylinder.ts); a shorter take is incomplete.
  const wav = Buffer.from(makeSurfaceWav({ seconds: 285, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed: 77 }))
  const tested = await request.post(`/api/workshop/blanks/${code}/surface-tests`, { headers: { origin: site }, multipart: { file: { name: `${code}.wav`, mimeType: 'audio/wav', buffer: wav } } })
  expect(tested.status(), await tested.text()).toBe(201)
  return code
}

/** A guest pays for one made-to-order cylinder on the payment fake; the webhook opens its ticket. */
async function paidMadeToOrder(request: APIRequestContext): Promise<string> {
  const checkout = await request.post('/api/checkout', {
    headers: { origin: site },
    data: { items: [{ slug: 'moth-and-mandrel-waltz', qty: 1 }], email: `guest-${Date.now()}@collectors.test`, shippingAddress: { name: 'Tamsin Orrell', line1: '4 Wick Lane', city: 'Lowmere', postalCode: 'LM3 1WL', region: 'OR', country: 'US' }, zone: 'domestic' },
  })
  expect(checkout.status(), await checkout.text()).toBe(201)
  const { orderNumber, url } = await checkout.json()
  const paid = await request.post(`${paymentFake}/_fake/sessions/${url.split('/').pop()}/complete?wait=true`, { data: {} })
  expect(paid.ok()).toBe(true)
  return orderNumber
}

test('the maker takes a paid order from the board to dispatch: a tested blank, the cut, the certificate', async ({ page }) => {
  const pageErrors: string[] = []
  page.on('pageerror', error => pageErrors.push(error.message))
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  const blankCode = await testedFourMinuteBlank(page.request)
  const recorders = await api(page.request, 'GET', '/api/workshop/recorders')
  if (!recorders.recorders.some((recorder: { inService: boolean }) => recorder.inService)) {
    await api(page.request, 'POST', '/api/workshop/recorders', { name: 'Bench Lathe', stylus: 'Sapphire, 0.003 in', horn: 'Brass, 26 in' })
  }
  const orderNumber = await paidMadeToOrder(page.request)

  await open(page, '/workshop')
  await page.getByRole('link', { name: /Production tickets/ }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Production tickets')
  const queued = page.getByTestId('column-queued').locator('article').filter({ hasText: orderNumber })
  await expect(queued).toHaveCount(1)
  await page.screenshot({ path: `${shots}/tickets-board-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.setViewportSize({ width: 390, height: 844 })
  await page.reload()
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/tickets-board-phone.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.setViewportSize({ width: 1280, height: 900 })

  // Filter the board by the order number, then open the ticket.
  await page.getByLabel('Order number').fill(orderNumber)
  await page.getByRole('button', { name: 'Search' }).click()
  await expect(page).toHaveURL(new RegExp(`q=${orderNumber}`))
  await expect(page.locator('article')).toHaveCount(1)
  await page.locator('article').getByRole('link').click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Moth and Mandrel Waltz')
  const currentStage = page.locator('[data-testid="ticket-stage"][aria-current="step"]')
  await expect(currentStage).toHaveText('Queued')
  await noSeriousAxe(page)

  await page.getByLabel(new RegExp(blankCode)).check()
  await page.getByRole('button', { name: 'Assign this blank' }).click()
  await expect(currentStage).toHaveText('Blank assigned')
  await expect(page.getByRole('region', { name: 'Blank', exact: true })).toContainText(`${blankCode} (Reserved)`)
  await noSeriousAxe(page)

  await expect(page.getByLabel('Recorder used')).not.toHaveValue('')
  await page.getByLabel('Notes').fill('Cut at 160 rpm, one take.')
  await page.getByRole('button', { name: 'Record the cut' }).click()
  await expect(currentStage).toHaveText('Cut')
  await noSeriousAxe(page)

  await page.getByRole('button', { name: 'Ready for dispatch' }).click()
  await expect(currentStage).toHaveText('To dispatch')
  await expect(page.getByText(/Ready to pack/).first()).toBeVisible()
  await expect(page.getByRole('region', { name: 'Log', exact: true })).toContainText('Cut → To dispatch')
  await page.screenshot({ path: `${shots}/ticket-detail-desktop.png`, fullPage: true })

  await page.getByRole('link', { name: 'Open the test certificate' }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Test certificate')
  await expect(page.getByText(blankCode)).toBeVisible()
  await expect(page.getByText(orderNumber)).toBeVisible()
  await expect(page.getByText(/Verdict:\s*passed/)).toBeVisible()
  await page.screenshot({ path: `${shots}/certificate-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.setViewportSize({ width: 390, height: 844 })
  await page.reload()
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/certificate-phone.png`, fullPage: true })
  await noSeriousAxe(page)

  // The dashboard and the recorders, for a look at the charts and the ranking.
  await page.setViewportSize({ width: 1280, height: 900 })
  await page.goto('/workshop')
  await expect(page.getByTestId('dashboard-stages')).toBeVisible()
  await expect(page.getByTestId('dashboard-stages').locator('canvas')).toBeVisible()
  await page.screenshot({ path: `${shots}/workshop-dashboard-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.goto('/workshop/recorders')
  await page.screenshot({ path: `${shots}/recorders-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  expect(pageErrors).toEqual([])
})

test('the board marks a recut ticket with its reason, and the stage filter finds it', async ({ page }) => {
  const pageErrors: string[] = []
  page.on('pageerror', error => pageErrors.push(error.message))
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  const blankCode = await testedFourMinuteBlank(page.request)
  const { recorders } = await api(page.request, 'GET', '/api/workshop/recorders')
  const recorder = recorders.find((candidate: { inService: boolean }) => candidate.inService)
    ?? await api(page.request, 'POST', '/api/workshop/recorders', { name: 'Recut Lathe', stylus: 'Sapphire, 0.003 in' })
  const orderNumber = await paidMadeToOrder(page.request)
  let ticketId = 0
  await expect.poll(async () => {
    ticketId = (await api(page.request, 'GET', `/api/workshop/tickets?q=${orderNumber}`)).tickets[0]?.id ?? 0
    return ticketId
  }).toBeGreaterThan(0)
  await api(page.request, 'POST', `/api/workshop/tickets/${ticketId}/assign`, { blankCode })
  await api(page.request, 'POST', `/api/workshop/tickets/${ticketId}/cut`, { recorderId: recorder.id })
  await api(page.request, 'POST', `/api/workshop/tickets/${ticketId}/stage`, { to: 'recut', note: 'A thump on the third turn.' })

  await open(page, '/workshop/tickets')
  await page.getByLabel('Stage').selectOption('recut')
  await expect(page).toHaveURL(/stage=recut/)
  const card = page.getByTestId(`ticket-${ticketId}`)
  await expect(card.getByTestId('recut-badge')).toHaveText('Recut')
  await expect(card).toContainText('Why recut: A thump on the third turn.')
  await expect(page.locator('article').filter({ hasNot: page.getByTestId('recut-badge') })).toHaveCount(0)
  await expect(page.getByTestId('board-count')).toContainText('being recut')
  await page.screenshot({ path: `${shots}/tickets-board-recut.png`, fullPage: true })
  await noSeriousAxe(page)

  await page.getByLabel('Stage').selectOption('queued')
  await expect(page).toHaveURL(/stage=queued/)
  await expect(page.getByTestId(`ticket-${ticketId}`)).toHaveCount(0)
  expect(pageErrors).toEqual([])
})
