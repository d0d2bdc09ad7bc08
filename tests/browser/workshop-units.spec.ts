import { expect, test, type Page } from '@playwright/test'
import { open } from './support/page'
import { signIn } from './support/signIn'

// The workshop reads and takes temperatures and weights in the shop's units: a pour typed in °F is
// stored in °C and shown in °C first once the shop switches; the figures form converts both ways.
// 150 °C = 302 °F and 32 °C = 89.6 °F by °F = °C × 9/5 + 32 (the Celsius and Fahrenheit scale definitions).

const shots = 'tests/browser/report'
const sizes = [['phone', { width: 390, height: 844 }], ['desktop', { width: 1280, height: 900 }]] as const

async function shoot(page: Page, path: string, name: string) {
  for (const [size, viewport] of sizes) {
    await page.setViewportSize(viewport)
    await page.goto(path)
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth), `${name} at ${size}: no sideways scroll`).toBe(true)
    await page.screenshot({ path: `${shots}/${name}-${size}.png`, fullPage: true })
  }
}

test('batches and workshop figures follow the shop\'s units, in °F / lb and in °C / kg', async ({ page, baseURL }) => {
  test.setTimeout(120_000)
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  const headers = { origin: baseURL! }
  const before = await (await page.request.get('/api/shop/units')).json()
  const setUnits = async (units: Record<string, string>) => {
    const answer = await page.request.put('/api/workshop/settings/units', { data: units, headers })
    expect(answer.status(), await answer.text()).toBe(200)
  }
  const engine = async () => (await (await page.request.get('/api/workshop/settings/engine')).json()).settings
  try {
    await setUnits({ temperature: 'F', length: 'in', weight: 'lb', locale: 'en-US' })

    // A batch added through the form of a °F shop: the pour typed as 302 is 302 °F.
    const code = `UN-${Date.now().toString(36).toUpperCase()}`
    await open(page, '/workshop/batches')
    const form = page.locator('form').filter({ has: page.getByRole('button', { name: 'Add the batch' }) })
    await form.getByLabel('Batch code').fill(code)
    await form.getByLabel('Formula').fill('stearic acid 70 / paraffin 20 / carnauba 10')
    await form.getByLabel('Volumetric expansion (millionths per K)').fill('760')
    await form.getByLabel('Poured at (°F)').fill('302')
    await expect(form.getByText('= 150 °C.')).toBeVisible()
    await form.getByRole('button', { name: 'Add the batch' }).click()
    await expect(page.getByText(`Batch ${code} added.`)).toBeVisible()
    const row = page.getByRole('row').filter({ hasText: code })
    await expect(row).toContainText('poured 302 °F (150 °C)')
    const stored = (await (await page.request.get('/api/workshop/batches')).json()).find((batch: { code: string }) => batch.code === code)
    expect(stored.pourTempC).toBeCloseTo(150, 3)

    // The figures form in °F and lb: the hold threshold 32 °C reads 89.6, a cylinder's 70 g 0.1543 lb.
    const figures = await engine()
    await page.goto('/workshop/figures')
    const hold = page.getByLabel('Hold the parcel from (°F)')
    await expect(hold).toHaveValue(String(Number((figures.heat.holdHighC * 9 / 5 + 32).toFixed(2))))
    await expect(page.getByLabel('A cylinder weighs (lb)')).toHaveValue(String(Number((figures.packing.cylinderWeightG / 453.59237).toFixed(4))))
    await shoot(page, '/workshop/batches', 'workshop-units-batches-f')
    await shoot(page, '/workshop/figures', 'workshop-units-figures-f')
    await shoot(page, '/workshop/blanks', 'workshop-units-register-f')

    // The same shop in °C and kg.
    await setUnits({ temperature: 'C', length: 'mm', weight: 'kg', locale: 'en-GB' })
    await page.setViewportSize({ width: 1280, height: 900 })
    await open(page, '/workshop/batches')
    await expect(page.getByRole('row').filter({ hasText: code })).toContainText('poured 150 °C (302 °F)')
    await page.getByRole('button', { name: `Edit batch ${code}` }).click()
    const editForm = page.locator('form').filter({ has: page.getByRole('button', { name: 'Save the batch' }) })
    await expect(editForm.getByLabel('Poured at (°C)')).toHaveValue('150')

    await open(page, '/workshop/figures')
    await expect(page.getByLabel('Hold the parcel from (°C)')).toHaveValue(String(figures.heat.holdHighC))
    await expect(page.getByLabel('Stricter per extra day in transit (°C)')).toHaveValue(String(figures.heat.stricterPerTransitDayC))
    // A weight typed in kilograms is stored in grams; the figures left alone are stored as they were.
    const cylinder = page.getByLabel('A cylinder weighs (kg)')
    await expect(cylinder).toHaveValue(String(figures.packing.cylinderWeightG / 1000))
    await cylinder.fill('0.085')
    await page.getByRole('button', { name: 'Save figures' }).click()
    await expect(page.getByText('Saved. The calculators')).toBeVisible()
    const after = await engine()
    expect(after.packing.cylinderWeightG).toBeCloseTo(85, 3)
    expect(after.heat).toEqual(figures.heat)
    expect(after.fit.referenceTemperatureF).toBe(figures.fit.referenceTemperatureF)
    await page.getByLabel('A cylinder weighs (kg)').fill(String(figures.packing.cylinderWeightG / 1000))
    await page.getByRole('button', { name: 'Save figures' }).click()
    await expect.poll(async () => (await engine()).packing.cylinderWeightG).toBeCloseTo(figures.packing.cylinderWeightG, 3)

    await shoot(page, '/workshop/batches', 'workshop-units-batches-c')
    await shoot(page, '/workshop/figures', 'workshop-units-figures-c')
    await shoot(page, '/workshop/blanks', 'workshop-units-register-c')
  }
  finally {
    await setUnits(before)
  }
})
