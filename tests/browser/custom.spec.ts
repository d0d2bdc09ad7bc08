import { execFileSync } from 'node:child_process'
import { mkdtempSync, readFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { expect, test, type APIRequestContext, type Browser, type Page } from '@playwright/test'
import { makeSurfaceWav } from '../../server/audio/synth'
import { messageFitForFormat } from '../../shared/utils/messageFit'
import { formatMoney } from '../../shared/utils/moneyFormat'
import { awake, noSeriousAxe, open } from './support/page'
import { signInThroughApi, site } from './support/signIn'

const shots = 'tests/browser/report'
const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const inbox = `http://127.0.0.1:${port + 1002}`
const paymentPage = new RegExp(`127\\.0\\.0\\.1:${port + 1003}/pay/cs_test_`)

const noSideways = async (page: Page) => expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)

/** A ten-word sentence, repeated: 10 times fits a 2-minute record, 30 is tight, 35 too long (317 words at most at 150 a minute). */
const sentence = 'Many happy returns from all of us at the workshop.'
const scriptOf = (times: number) => Array.from({ length: times }, () => sentence).join(' ')
const clock = (seconds: number) => `${Math.floor(Math.round(seconds) / 60)}:${String(Math.round(seconds) % 60).padStart(2, '0')}`
const verdictLabels = { fits: 'Fits', tight: 'Tight', too_long: 'Too long' } as const
const dayBefore = (date: string) => new Date(Date.parse(`${date}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10)

interface Quote {
  fit: { words: number, seconds: number, capacitySeconds: number, verdict: keyof typeof verdictLabels, wordsLeft: number }
  price: { currency: string, parts: { id: string, amountMinor: number }[], totalMinor: number }
  earliestDate: string
  canOrder: boolean
  reasons: { field: string, message: string }[]
}

async function quoteFor(request: APIRequestContext, body: Record<string, unknown>): Promise<Quote> {
  const answer = await request.post('/api/custom/quote', { headers: { origin: site }, data: { format: 'two_minute', rpm: 160, voice: 'maker', rush: false, ...body } })
  expect(answer.status(), await answer.text()).toBe(200)
  return await answer.json()
}

const address = { name: 'Iris Quillfeather', line1: '3 Candle Row', city: 'Lowmere', postalCode: 'LM4 2CR', region: 'OR', country: 'US' }

test('the meter and the price on /custom are the quote\'s; a message too long or wished too early cannot be ordered', async ({ page }) => {
  const pageErrors: string[] = []
  page.on('pageerror', error => pageErrors.push(error.message))
  await page.setViewportSize({ width: 1280, height: 900 })
  await open(page, '/custom')
  await page.getByLabel('Occasion').fill('Birthday')
  await page.getByLabel('Recipient\'s name').fill('Odile Fenwick')
  const date = page.getByLabel('Wished-for date')
  await expect(date).not.toHaveValue('')
  const addButton = page.getByRole('button', { name: 'Add to cart' })

  for (const [times, verdict] of [[10, 'fits'], [30, 'tight'], [35, 'too_long']] as const) {
    const script = scriptOf(times)
    await page.getByLabel('The script').fill(script)
    const expected = await quoteFor(page.request, { script, wishedDate: await date.inputValue() })
    expect(expected.fit.verdict).toBe(verdict)
    await expect(page.getByTestId('fit-words')).toHaveText(String(expected.fit.words))
    await expect(page.getByTestId('fit-verdict')).toHaveText(verdictLabels[verdict])
    await expect(page.getByTestId('fit-seconds')).toHaveText(clock(expected.fit.seconds))
    await expect(page.getByTestId('fit-capacity')).toHaveText(clock(expected.fit.capacitySeconds))
    await expect(page.getByTestId('fit-words-left')).toHaveText(String(Math.abs(expected.fit.wordsLeft)))
    await expect(page.getByTestId('price-total')).toHaveText(formatMoney(expected.price.totalMinor, expected.price.currency))
    for (const part of expected.price.parts) {
      await expect(page.getByTestId(`price-part-${part.id}`)).toContainText(formatMoney(part.amountMinor, expected.price.currency))
    }
    if (verdict === 'too_long') {
      await expect(addButton).toBeDisabled()
      await expect(page.getByTestId('cannot-make')).toContainText('too long')
    }
    else {
      await expect(addButton).toBeEnabled()
    }
    if (verdict === 'tight') {
      await page.screenshot({ path: `${shots}/custom-desktop.png`, fullPage: true })
      await noSeriousAxe(page)
      await page.setViewportSize({ width: 390, height: 844 })
      await noSideways(page)
      await page.screenshot({ path: `${shots}/custom-phone.png`, fullPage: true })
      await noSeriousAxe(page)
      await page.setViewportSize({ width: 1280, height: 900 })
    }
  }

  // A date before the earliest one: the field says which date is possible and the button stays off.
  await page.getByLabel('The script').fill(scriptOf(10))
  const earliest = (await quoteFor(page.request, { script: scriptOf(10) })).earliestDate
  await expect(date).toHaveAttribute('min', earliest)
  await date.fill(dayBefore(earliest))
  await expect(page.getByTestId('earliest-date')).toContainText(earliest)
  await expect(addButton).toBeDisabled()
  await date.fill(earliest)
  await expect(addButton).toBeEnabled()

  // A "recording" that is not audio: the upload's refusal is shown and the message cannot be added.
  await page.getByLabel('Your own recording, played into the horn by the maker').check()
  await page.getByLabel(/^Your recording/).setInputFiles({ name: 'toast.wav', mimeType: 'audio/wav', buffer: Buffer.from('Not a recording at all, only words.\n'.repeat(40)) })
  await expect(page.getByTestId('upload-status')).toContainText('only WAV, MP3 or Ogg recordings are taken here')
  await expect(addButton).toBeDisabled()
  // A real recording: the page shows its measured length, and the meter counts it instead of the script.
  await page.getByLabel(/^Your recording/).setInputFiles({ name: 'toast.wav', mimeType: 'audio/wav', buffer: proofWav(5, 220) })
  await expect(page.getByTestId('upload-status')).toContainText('toast.wav: 0:05 long')
  const recorded = await quoteFor(page.request, { voice: 'upload', voiceSeconds: 5, wishedDate: earliest })
  await expect(page.getByTestId('fit-seconds')).toHaveText(clock(recorded.fit.seconds))
  await expect(page.getByTestId('price-total')).toHaveText(formatMoney(recorded.price.totalMinor, recorded.price.currency))
  await expect(addButton).toBeEnabled()
  await page.getByLabel('The maker reads your script into the horn').check()
  await expect(addButton).toBeEnabled()

  // Sent to checkout anyway, each is refused with a 400 naming the field; nothing is ordered.
  const message = { occasion: 'Birthday', recipientName: 'Odile Fenwick', voice: 'maker', format: 'two_minute', rpm: 160, rush: false }
  for (const [wrong, field] of [[{ script: scriptOf(35), wishedDate: earliest }, 'customMessages.0.script'], [{ script: scriptOf(10), wishedDate: dayBefore(earliest) }, 'customMessages.0.wishedDate']] as const) {
    const refused = await page.request.post('/api/checkout', { headers: { origin: site }, data: { customMessages: [{ ...message, ...wrong }], email: `refused-${Date.now()}@collectors.test`, shippingAddress: address, zone: 'domestic' } })
    expect(refused.status(), await refused.text()).toBe(400)
    expect(Object.keys((await refused.json()).data.fields)).toContain(field)
  }

  // The guide's table of what fits agrees with the fit engine at the shop's default figures.
  await page.getByRole('link', { name: 'How much fits, how long it takes, how proofs work' }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Personal messages on wax')
  const table = page.getByRole('table')
  for (const format of ['two_minute', 'four_minute'] as const) {
    await expect(table).toContainText(String(messageFitForFormat('', format).maxWords))
  }
  await noSeriousAxe(page)
  expect(pageErrors).toEqual([])
})

/** A two-minute blank through the register: cast, reamed, shaved and a quiet play-through that passes. */
async function testedTwoMinuteBlank(request: APIRequestContext, seed: number): Promise<string> {
  const api = async (path: string, body: Record<string, unknown>) => {
    const answer = await request.post(path, { headers: { origin: site }, data: body })
    expect(answer.status(), `${path}: ${await answer.text()}`).toBeLessThan(300)
    return await answer.json()
  }
  const batch = await api('/api/workshop/batches', { code: `MSG-${Date.now()}-${seed}`, formula: 'stearic acid 75 / paraffin 15 / carnauba 10', pourDate: '2026-04-02', volumetricExpansionPerK: 0.00075 })
  const { codes } = await api('/api/workshop/blanks', { batchId: batch.id, format: 'two_minute', count: 1, diameterIn: '2.206' })
  const code = codes[0] as string
  await api(`/api/workshop/blanks/${code}/reaming`, { overhangBeforeIn: '3/16', overhangAfterIn: '7/16', reamings: 4, roomTemperatureF: 74 })
  await api(`/api/workshop/blanks/${code}/shaving`, { lowDiameterIn: '2.200', wheelDegrees: 45, passes: 1, diameterAfterIn: '2.200' })
  // A full play-through: a 4-minute surface plays 3.8 in × 200 ÷ 160 rpm = 285 s (shared/utils/cylinder.ts); a shorter take is incomplete.
  const wav = Buffer.from(makeSurfaceWav({ seconds: 285, sampleRate: 22_050, levelDbfs: -58, swellDepth: 0.02, seed }))
  const tested = await request.post(`/api/workshop/blanks/${code}/surface-tests`, { headers: { origin: site }, multipart: { file: { name: `${code}.wav`, mimeType: 'audio/wav', buffer: wav } } })
  expect(tested.status(), await tested.text()).toBe(201)
  return code
}

/** A short spoken-range tone as the transfer of a cut, made by sox. */
function proofWav(seconds: number, hz: number): Buffer {
  const path = join(mkdtempSync(join(tmpdir(), 'gw-proof-')), 'proof.wav')
  execFileSync('sox', ['-n', '-r', '22050', '-c', '1', '-b', '16', path, 'synth', String(seconds), 'sine', String(hz), 'vol', '0.3'])
  return readFileSync(path)
}

async function makerPage(browser: Browser) {
  const context = await browser.newContext({ baseURL: site, viewport: { width: 1280, height: 900 } })
  const page = await context.newPage()
  await signInThroughApi(page, 'maker')
  return page
}

/** The maker cuts on the given blank and sends a proof from the ticket page. */
async function cutAndSendProof(page: Page, ticketId: number, blankCode: string, take: number) {
  await open(page, `/workshop/tickets/${ticketId}`)
  const stage = page.locator('[data-testid="ticket-stage"][aria-current="step"]')
  await page.getByLabel(new RegExp(blankCode)).check()
  // The first time the blank is assigned; after a re-cut the rejected one is changed for a fresh one.
  await page.getByRole('button', { name: /^(Assign this blank|Change to this blank)$/ }).click()
  await expect(page.getByRole('region', { name: 'Blank', exact: true })).toContainText(`${blankCode} (Reserved)`)
  await expect(stage).toHaveText('Blank assigned')
  await page.getByRole('button', { name: 'Record the cut' }).click()
  await expect(stage).toHaveText('Cut')
  await page.getByLabel('Transfer of the cut (WAV or MP3)').setInputFiles({ name: `take-${take}.wav`, mimeType: 'audio/wav', buffer: proofWav(2 + take, 330 + take * 110) })
  await page.getByLabel('Note for the customer').fill(`Take ${take}, cut at 160 rpm.`)
  if (take === 1) {
    await page.screenshot({ path: `${shots}/ticket-proof-desktop.png`, fullPage: true })
    await noSeriousAxe(page)
  }
  await page.getByRole('button', { name: 'Send proof' }).click()
  await expect(stage).toHaveText('Proof sent')
}

const audioSeconds = (page: Page, index: number) => page.locator('audio').nth(index).evaluate((audio: HTMLAudioElement) => new Promise<number>((resolve, reject) => {
  if (audio.readyState >= 1) return resolve(audio.duration)
  audio.addEventListener('loadedmetadata', () => resolve(audio.duration), { once: true })
  audio.addEventListener('error', () => reject(new Error(`audio failed: ${audio.error?.message}`)), { once: true })
  audio.load()
}))

test('a collector orders a message, hears the proof, asks for a re-cut, approves the second; each mail arrives once', async ({ page, browser }) => {
  test.setTimeout(180_000)
  const startedAt = Date.now() - 1000
  const pageErrors: string[] = []
  page.on('pageerror', error => pageErrors.push(error.message))
  await page.setViewportSize({ width: 1280, height: 900 })
  const collector = await signInThroughApi(page, 'collector')

  // Filled once the page is awake: a page still waking up resets what was typed into it.
  await open(page, '/custom')
  await page.getByLabel('Occasion').fill('Wedding')
  await page.getByLabel('Recipient\'s name').fill('Tamsin and Orrin')
  await page.getByLabel('The script').fill(scriptOf(8))
  await expect(page.getByTestId('fit-verdict')).toHaveText('Fits')
  await page.getByRole('button', { name: 'Add to cart' }).click()
  await expect(page.getByText('is in your cart')).toBeVisible()

  await open(page, '/cart')
  const line = page.getByTestId('cart-message-0')
  await expect(line).toContainText('Wedding · for Tamsin and Orrin')
  await expect(line).toContainText('Many happy returns from all of us')
  await page.locator('input[name="name"]').fill(address.name)
  await page.locator('input[name="line1"]').fill(address.line1)
  await page.getByLabel('Postal code').fill(address.postalCode)
  await page.getByLabel('Town or city').fill(address.city)
  await page.getByLabel('Country').selectOption(address.country)
  await expect(page.getByTestId('cart-total')).toContainText('$')
  await page.screenshot({ path: `${shots}/cart-message-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.setViewportSize({ width: 390, height: 844 })
  await noSideways(page)
  await page.screenshot({ path: `${shots}/cart-message-phone.png`, fullPage: true })
  await page.setViewportSize({ width: 1280, height: 900 })
  await page.getByRole('button', { name: 'Go to payment' }).click()
  await expect(page).toHaveURL(paymentPage)
  await page.getByRole('button', { name: 'Pay' }).click()
  await expect(page).toHaveURL(/\/checkout\/done\?order=GW\d{2}-\d{5}/)
  const orderNumber = new URL(page.url()).searchParams.get('order')!

  const maker = await makerPage(browser)
  const blanks = [await testedTwoMinuteBlank(maker.request, 91), await testedTwoMinuteBlank(maker.request, 92)]
  const { recorders } = await (await maker.request.get('/api/workshop/recorders')).json()
  if (!recorders.some((recorder: { inService: boolean }) => recorder.inService)) {
    await maker.request.post('/api/workshop/recorders', { headers: { origin: site }, data: { name: 'Message Lathe', stylus: 'Sapphire, 0.003 in' } })
  }
  let ticketId = 0
  await expect.poll(async () => {
    ticketId = (await (await maker.request.get(`/api/workshop/tickets?q=${orderNumber}`)).json()).tickets[0]?.id ?? 0
    return ticketId
  }, { timeout: 15_000 }).toBeGreaterThan(0)
  // The board shows the message's fit and its wished-for date.
  await open(maker, `/workshop/tickets?q=${orderNumber}`)
  await expect(maker.getByTestId(`ticket-${ticketId}`).getByTestId('custom-fit')).toContainText(/Message 0:\d\d, fits ·\s+wished for (\d+ \w+|\w+ \d+,) 20\d\d/)
  await cutAndSendProof(maker, ticketId, blanks[0]!, 1)

  // The cue sheet: the script in large type with its marks.
  await maker.getByRole('link', { name: 'Open the cue sheet' }).click()
  await expect(maker.getByRole('heading', { level: 1 })).toHaveText('Wedding for Tamsin and Orrin')
  await expect(maker.getByTestId('cue-script')).toContainText('Many happy returns')
  await expect(maker.getByTestId('cue-mark').first()).toHaveText('0:15')
  await maker.screenshot({ path: `${shots}/cue-sheet-desktop.png`, fullPage: true })
  await noSeriousAxe(maker)
  await maker.setViewportSize({ width: 390, height: 844 })
  await noSideways(maker)
  await maker.screenshot({ path: `${shots}/cue-sheet-phone.png`, fullPage: true })
  await maker.emulateMedia({ media: 'print' })
  await expect(maker.locator('header:has(#site-nav)')).toBeHidden()
  await maker.emulateMedia({ media: 'screen' })
  await maker.setViewportSize({ width: 1280, height: 900 })

  // The collector hears the proof and asks for a re-cut.
  await open(page, `/orders/${orderNumber}`)
  const proofs = page.getByRole('region', { name: /Your personal message/ })
  await expect(proofs.getByText('Take 1, cut at 160 rpm.')).toBeVisible()
  expect(await audioSeconds(page, 0)).toBeGreaterThan(0)
  await page.screenshot({ path: `${shots}/order-proof-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.setViewportSize({ width: 390, height: 844 })
  await noSideways(page)
  await page.screenshot({ path: `${shots}/order-proof-phone.png`, fullPage: true })
  await page.setViewportSize({ width: 1280, height: 900 })
  await expect(proofs.getByText('1 free re-cut left.')).toBeAttached()
  await proofs.getByRole('button', { name: 'Ask for a re-cut' }).click()
  await proofs.getByLabel('What should be different?').fill('Please say "Orrin" with a long O.')
  await proofs.getByRole('button', { name: 'Send the re-cut request' }).click()
  await expect(proofs.getByTestId('proof-answer')).toContainText('You asked for a re-cut')

  // The maker cuts again on a fresh blank and sends a second proof; the collector approves it.
  await cutAndSendProof(maker, ticketId, blanks[1]!, 2)
  await page.reload()
  await awake(page)
  await expect(proofs.getByText('Take 2, cut at 160 rpm.')).toBeVisible()
  expect(await audioSeconds(page, 0)).toBeGreaterThan(0)
  // The free re-cut is used: asking again shows the server's refusal with the price, and a way to pay.
  await proofs.getByRole('button', { name: 'Ask for a re-cut' }).click()
  await expect(proofs.getByText('No free re-cuts left: a further one is charged.')).toBeVisible()
  await proofs.getByLabel('What should be different?').fill('A little slower, please.')
  await proofs.getByRole('button', { name: 'Send the re-cut request' }).click()
  await expect(proofs.getByRole('alert')).toContainText('a further re-cut costs $')
  await expect(proofs.getByRole('button', { name: /^Pay \$\d+\.\d\d for a re-cut$/ })).toBeVisible()
  await proofs.getByRole('button', { name: 'Approve this proof' }).click()
  await expect(proofs.getByTestId('proof-answer').first()).toContainText('You approved this proof')
  await expect.poll(async () => (await (await maker.request.get(`/api/workshop/tickets/${ticketId}`)).json()).stage).toBe('approved')

  // Each mail once: order paid, message received, two proofs (different texts), the approval.
  // Only this run's mail: the inbox keeps earlier runs' (whose order numbers start over with the database).
  const mails = async () => (await (await fetch(`${inbox}/api/messages?to=${encodeURIComponent(collector.email)}`)).json() as { subject: string, text: string, receivedAt: string }[])
    .filter(mail => mail.subject.includes(orderNumber) && Date.parse(mail.receivedAt) >= startedAt)
  await expect.poll(async () => (await mails()).length, { timeout: 20_000 }).toBeGreaterThanOrEqual(5)
  await page.waitForTimeout(1500)
  const received = await mails()
  const subjects = received.map(mail => mail.subject)
  expect(subjects.filter(subject => subject.startsWith('A proof of your message is ready'))).toHaveLength(2)
  for (const subject of new Set(subjects)) {
    if (!subject.startsWith('A proof of your message is ready')) expect(subjects.filter(other => other === subject), subject).toHaveLength(1)
  }
  expect(new Set(received.map(mail => `${mail.subject}\n${mail.text}`)).size).toBe(received.length)
  expect(subjects.some(subject => subject.includes('approved'))).toBe(true)
  expect(pageErrors).toEqual([])
  await maker.context().close()
})
