import { expect, test, type Locator, type Page } from '@playwright/test'
import { noSeriousAxe, open } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'

/** The bench, awake: its plan buttons are enabled once the page's script has taken over, so what is typed then is kept. */
async function benchReady(page: Page) {
  await expect(page.getByRole('button', { name: 'Plan the reaming' })).toBeEnabled()
}

async function openBench(page: Page) {
  await page.goto('/workshop/bench')
  await benchReady(page)
}

/** The large figure of a readout in an answer, found by its name. */
const readout = (answer: Locator, label: string) => answer.locator('dl > div').filter({ hasText: label }).locator('dd').first()

async function planReaming(page: Page) {
  const reaming = page.getByRole('region', { name: 'Reaming plan' })
  await reaming.getByLabel('Overhang showing now').fill('3/16')
  await reaming.getByLabel('Wanted overhang').fill('7/16')
  await reaming.getByRole('button', { name: 'Plan the reaming' }).click()
  const answer = page.getByTestId('reaming-answer')
  // 3/16 in showing with 7/16 in wanted: 4 more reamings (common practice, no source).
  await expect(readout(answer, 'Reamings to go')).toHaveText('4')
  // 7/16 in = 0.4375 in = 11.1125 mm (NIST 1 in = 25.4 mm exactly).
  await expect(answer).toContainText('7/16 in')
  await expect(answer).toContainText('11.11 mm')
  await expect(answer).toContainText('Over-reaming cannot be undone')
}

async function planShaving(page: Page) {
  const shaving = page.getByRole('region', { name: 'Shaving plan' })
  await shaving.getByLabel('Largest diameter read').fill('2.200')
  await shaving.getByLabel('Smallest diameter read').fill('2.194')
  await shaving.getByLabel('In-feed wheel per pass (degrees)').fill('45')
  await shaving.getByRole('button', { name: 'Plan the shaving' }).click()
  const answer = page.getByTestId('shaving-answer')
  // (2.200 − 2.194) ÷ 2 = 0.003 in, and 45° of wheel feeds 0.003 in (common practice, no source): one pass.
  await expect(readout(answer, 'Passes')).toHaveText('1')
  await expect(answer).toContainText('0.0030 in · 0.076 mm a pass')
  // 2.200 − 2 × 0.003 = 2.194 in = 55.7276 mm (NIST).
  await expect(readout(answer, 'Diameter after')).toHaveText('2.194 in')
  await expect(answer).toContainText('55.73 mm')
}

test('the maker plans a reaming and a shaving from typed fractions and reads millimetres beside inches', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await open(page, '/workshop')
  await page.getByRole('link', { name: /Bench calculators/ }).click()
  await expect(page).toHaveURL(/\/workshop\/bench$/)
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Bench calculators')
  await benchReady(page)

  await planReaming(page)
  await planShaving(page)

  // The cautions where cutting is involved, ending with local codes and licensed practice.
  const safety = page.getByRole('complementary', { name: /reamer and the shaving cutter/ })
  await expect(safety).toContainText('eye protection')
  await expect(safety).toContainText('fingers clear of the cutter')
  await expect(safety).toContainText('never blow them off')
  await expect(safety).toContainText('local codes and licensed practice come first')
  await expect(page.getByRole('region', { name: 'Shaving plan' })).toContainText('Cut no deeper than needed')

  // The heat calculator opens with an answer, its taper marked unverified.
  await expect(page.getByTestId('heat-fit-taper')).toContainText('3/8 in per foot')
  await expect(page.getByTestId('heat-fit-taper')).toContainText('UNVERIFIED')

  await page.screenshot({ path: `${shots}/bench-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
})

test('a mistyped fraction is marked on its own field, and the plan follows once it is right', async ({ page }) => {
  await signIn(page, 'maker')
  await openBench(page)
  const reaming = page.getByRole('region', { name: 'Reaming plan' })
  const overhang = reaming.getByLabel('Overhang showing now')
  await overhang.fill('7/0')
  await reaming.getByLabel('Wanted overhang').fill('7/16')
  await overhang.press('Enter')
  await expect(reaming.getByRole('alert')).toContainText('Please correct the marked fields.')
  await expect(overhang).toHaveAttribute('aria-invalid', 'true')
  await expect(overhang).toHaveAccessibleDescription(/division by zero/)
  await overhang.fill('1 3/16')
  await overhang.press('Enter')
  await expect(overhang).not.toHaveAttribute('aria-invalid', 'true')
  // 1 3/16 in showing with 7/16 in wanted is already 3/4 in past the fit: no reaming.
  await expect(readout(page.getByTestId('reaming-answer'), 'Reamings to go')).toHaveText('0')
  await expect(page.getByTestId('reaming-answer')).toContainText('past the wanted fit')
})

test('the bench works at phone width: no sideways scrolling, answers readable, axe finds nothing serious', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 })
  await signIn(page, 'maker')
  await openBench(page)
  await planReaming(page)
  await planShaving(page)
  await page.getByRole('region', { name: 'Playing time' }).getByRole('button', { name: 'Work out the time' }).click()
  // 3.6 in × 100 ÷ 160 rpm = 2.25 min = 2 min 15 s (university sound archives' cylinder notes; arithmetic).
  await expect(readout(page.getByTestId('playing-time-answer'), 'Playing time')).toHaveText('2 min 15 s')
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
  expect(overflow).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/bench-phone.png`, fullPage: true })
  await noSeriousAxe(page)
})

test('the shaving plan takes a fraction and millimetres for the diameters', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await openBench(page)
  const shaving = page.getByRole('region', { name: 'Shaving plan' })
  // 2 13/64 in = 2.203125 in; 55.5625 mm = 2.1875 in (NIST 1 in = 25.4 mm exactly).
  await shaving.getByLabel('Largest diameter read').fill('2 13/64')
  await shaving.getByLabel('Smallest diameter read').fill('55.5625 mm')
  await shaving.getByLabel('In-feed wheel per pass (degrees)').fill('45')
  await shaving.getByRole('button', { name: 'Plan the shaving' }).click()
  const answer = page.getByTestId('shaving-answer')
  // (2.203125 − 2.1875) ÷ 2 = 0.0078 in on the radius at 0.003 in a pass (common practice, no source): 3 passes,
  // leaving 2.203125 − 2 × 0.009 = 2.185125 in; (2.185125 − 2.1) ÷ 0.006 → 14 more surfaces (shop defaults).
  await expect(readout(answer, 'Passes')).toHaveText('3')
  await expect(readout(answer, 'Diameter after')).toHaveText('2.185 in')
  await expect(readout(answer, 'Surfaces left')).toHaveText('14')
})

test('the maker changes the workshop figures: a bad one is named, a fraction is kept as typed', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await open(page, '/workshop/settings')
  await page.getByRole('link', { name: 'Open the workshop figures' }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Workshop figures')
  await expect(page.getByRole('button', { name: 'Save figures' })).toBeEnabled()
  const taper = page.getByLabel('Mandrel taper, diameter per foot (in)')
  await expect(taper).toHaveValue('3/8')
  await page.getByLabel('Speaking rate (words a minute)').fill('fast')
  await page.getByRole('button', { name: 'Save figures' }).click()
  await expect(page.getByText('wordsPerMinute must be a number')).toBeVisible()
  await page.getByLabel('Speaking rate (words a minute)').fill('140')
  await taper.fill('1/2')
  await page.getByRole('button', { name: 'Save figures' }).click()
  await expect(page.getByText('Saved. The calculators')).toBeVisible()
  await page.reload()
  await expect(page.getByRole('button', { name: 'Save figures' })).toBeEnabled()
  await expect(page.getByLabel('Mandrel taper, diameter per foot (in)')).toHaveValue('1/2')
  await expect(page.getByLabel('Speaking rate (words a minute)')).toHaveValue('140')
  await page.screenshot({ path: `${shots}/workshop-figures-desktop.png` })
  await noSeriousAxe(page)
  // Back to the shop defaults for the other tests.
  await page.getByRole('button', { name: 'Fill in the shop defaults' }).click()
  await page.getByRole('button', { name: 'Save figures' }).click()
  await expect(page.getByText('Saved. The calculators')).toBeVisible()
  await expect(page.getByLabel('Mandrel taper, diameter per foot (in)')).toHaveValue('3/8')
})

test('a reaming and a shaving planned on the bench are recorded on a blank\'s log', async ({ page, baseURL }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  const post = async (path: string, data: object) => {
    const answer = await page.request.post(path, { data, headers: { origin: baseURL! } })
    expect(answer.status(), `${path}: ${await answer.text()}`).toBe(201)
    return answer.json()
  }
  const batch = await post('/api/workshop/batches', { code: `BN-${Date.now().toString(36).toUpperCase()}`, formula: 'stearic acid 70 / paraffin 30', pourDate: '2026-11-20', volumetricExpansionPerK: 0.00075 })
  const { codes: [code] } = await post('/api/workshop/blanks', { batchId: batch.id, format: 'two_minute', count: 1, diameterIn: '2.203', location: 'Bench' })

  await openBench(page)
  await planReaming(page)
  const reaming = page.getByRole('region', { name: 'Reaming plan' })
  await reaming.getByText('Record this reaming on a blank\'s log').click()
  const reamingRecord = reaming.getByRole('form', { name: 'Record the reaming on a blank' })
  // The plan's first set and its expected overhang are offered as a start.
  await expect(reamingRecord.getByLabel('Reamings done')).toHaveValue('4')
  await expect(reamingRecord.getByLabel('Overhang read after (in)')).toHaveValue('7/16')
  await reamingRecord.getByLabel('Blank code').fill('GW-00-0000')
  await reamingRecord.getByRole('button', { name: 'Record on the blank' }).click()
  await expect(reamingRecord.getByText('No blank GW-00-0000 in the register.')).toBeVisible()
  await reamingRecord.getByLabel('Blank code').fill(code.toLowerCase())
  await reamingRecord.getByRole('button', { name: 'Record on the blank' }).click()
  await expect(reamingRecord.getByText(`Recorded on ${code}; the blank is now reamed.`)).toBeVisible()

  const shaving = page.getByRole('region', { name: 'Shaving plan' })
  await shaving.getByLabel('Largest diameter read').fill('2.203')
  await shaving.getByLabel('Smallest diameter read').fill('2.199')
  await shaving.getByRole('button', { name: 'Plan the shaving' }).click()
  await shaving.getByText('Record this shaving on a blank\'s log').click()
  const shavingRecord = shaving.getByRole('form', { name: 'Record the shaving on a blank' })
  await shavingRecord.getByLabel('Blank code').fill(code)
  await shavingRecord.getByLabel('Diameter read after (in)').fill('2.197')
  await shavingRecord.getByRole('button', { name: 'Record on the blank' }).click()
  await expect(shavingRecord.getByText(`Recorded on ${code}; the blank is now shaved.`)).toBeVisible()
  await shaving.screenshot({ path: `${shots}/bench-record-on-blank.png` })
  // A second press cannot log the same shaving twice.
  await expect(shavingRecord.getByRole('button', { name: 'Recorded' })).toBeDisabled()

  await shavingRecord.getByRole('link', { name: code }).click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText(code)
  await expect(page.getByText('2.197 in').first()).toBeVisible()
})

test('heat and fit from a poured batch brings its own expansion and warns near its softening point', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await openBench(page)
  const card = page.getByRole('region', { name: 'Heat and fit' })
  await card.getByLabel('Blank temperature').fill('45')
  await card.getByLabel('Unit').selectOption('C')
  await card.getByLabel('Wax', { exact: true }).selectOption({ label: 'WB-26-03 · paraffin 55 / stearic acid 35 / beeswax 10' })
  await card.getByRole('button', { name: 'Work out the shift' }).click()
  // The demo batch WB-26-03 (invented): 660 × 10⁻⁶ per K, softening at 52 °C, so 45 °C is 7 °C short of it.
  await expect(card.getByTestId('heat-fit-wax')).toContainText('Expansion of batch WB-26-03: 660 × 10⁻⁶ per K')
  // Worded in the shop's unit (°F by default), °C beside: 7 °C is a 12.6 °F step, 52 °C is 125.6 °F (NIST SP 811 B.8).
  await expect(card).toContainText('within 12.6 °F (7 °C) of batch WB-26-03\'s softening point of 125.6 °F (52 °C)')
})

test('in a °C and millimetre shop the bench takes and answers in those units: 35 °C grows the bore as 95 °F does', async ({ page, baseURL }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  const setUnits = async (units: { temperature: 'C' | 'F', length: 'in' | 'mm', weight: 'lb' | 'kg', locale: string }) => {
    const answer = await page.request.put('/api/workshop/settings/units', { data: units, headers: { origin: baseURL! } })
    expect(answer.status(), await answer.text()).toBe(200)
  }
  const card = page.getByRole('region', { name: 'Heat and fit' })
  const answer = page.getByTestId('heat-fit-answer')
  const growth = () => answer.locator('dl > div').filter({ hasText: 'Bore grows' }).locator('dd')
  async function shift(temperature: string) {
    await card.getByLabel('Blank temperature').fill(temperature)
    await card.getByRole('button', { name: 'Work out the shift' }).click()
    await expect(card.getByRole('button', { name: 'Work out the shift' })).toBeEnabled()
  }

  // The shop's default units (°F, inches): 95 °F, the bore's growth in inches with millimetres beside.
  await openBench(page)
  await expect(card.locator('#heat-fit-unit')).toHaveValue('F')
  await shift('20')
  await shift('95')
  await expect(growth().first()).toHaveText(/^0\.\d{4} in$/)
  const mmAt95F = /(0\.\d{3}) mm/.exec(await growth().nth(1).innerText())![1]!

  try {
    await setUnits({ temperature: 'C', length: 'mm', weight: 'kg', locale: 'en-GB' })
    await openBench(page)
    // The unit chosen and the labels follow the shop; lengths are asked for in millimetres.
    await expect(card.locator('#heat-fit-unit')).toHaveValue('C')
    await expect(card.getByLabel('Blank temperature (°C)')).toBeVisible()
    await expect(card.getByLabel('Bore diameter (mm)')).toBeVisible()
    await expect(page.getByRole('region', { name: 'Reaming plan' }).getByLabel('Blank temperature (°C)')).toBeVisible()
    await shift('30')
    await expect(growth().first()).not.toHaveText(`${mmAt95F} mm`)
    // 35 °C = 95 °F exactly ((95 − 32) × 5/9, the Celsius–Fahrenheit definition): the same growth, now millimetres first.
    await shift('35')
    await expect(growth().first()).toHaveText(`${mmAt95F} mm`)
    await expect(growth().nth(1)).toContainText(' in, ')
    await page.screenshot({ path: `${shots}/bench-metric-desktop.png`, fullPage: true })
    await page.setViewportSize({ width: 390, height: 844 })
    await page.screenshot({ path: `${shots}/bench-metric-phone.png`, fullPage: true })
  }
  finally {
    await setUnits({ temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' })
  }
})
