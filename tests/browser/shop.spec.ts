import AxeBuilder from '@axe-core/playwright'
import { expect, test, type Page } from '@playwright/test'

const shots = 'tests/browser/report'
const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const inbox = `http://127.0.0.1:${port + 1002}`

async function noSeriousAxe(page: Page) {
  const result = await new AxeBuilder({ page }).analyze()
  const serious = result.violations.filter(v => v.impact === 'serious' || v.impact === 'critical')
  expect(serious.map(v => `${v.id}: ${v.nodes.map(n => n.target.join(' ')).join(', ')}`)).toEqual([])
}

async function addFirstInStock(page: Page, kind: 'recorded' | 'blank') {
  await page.goto(`/cylinders?kind=${kind}`)
  const cards = page.locator('article').filter({ hasNot: page.getByText('Sold out') })
  await cards.first().getByRole('heading').getByRole('link').click()
  await expect(page).toHaveURL(/\/cylinders\/[a-z0-9-]+$/)
  await expect(page.getByRole('button', { name: 'Add to cart' })).toBeVisible()
  const title = (await page.getByRole('heading', { level: 1 }).textContent())!.trim()
  await page.getByRole('button', { name: 'Add to cart' }).click()
  await expect(page.getByText('added to your cart')).toBeVisible()
  return title
}

test('a guest buys a recorded cylinder and a blank, pays on the local checkout page, and sees the order paid', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await page.goto('/cylinders')
  await expect(page.getByText(/cylinders? found/)).toBeVisible()
  await page.screenshot({ path: `${shots}/catalogue-desktop.png`, fullPage: true })
  await noSeriousAxe(page)

  const recorded = await addFirstInStock(page, 'recorded')
  await page.screenshot({ path: `${shots}/product-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  const blank = await addFirstInStock(page, 'blank')

  await page.goto('/cart')
  await expect(page.getByRole('link', { name: recorded })).toBeVisible()
  await expect(page.getByRole('link', { name: blank })).toBeVisible()
  await expect(page.getByTestId('cart-total')).toContainText('$')
  const email = `guest-${Date.now()}@collectors.test`
  await page.getByLabel('E-mail').fill(email)
  await page.locator('input[name="name"]').fill('Wren Holloway')
  await page.locator('input[name="line1"]').fill('9 Quill Lane')
  await page.getByLabel('Postal code').fill('LM2 4AB')
  await page.getByLabel('Town or city').fill('Lowmere')
  await page.getByLabel('Country').fill('Utopia')
  await page.screenshot({ path: `${shots}/cart-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.getByRole('button', { name: 'Go to payment' }).click()

  await expect(page).toHaveURL(new RegExp(`127\\.0\\.0\\.1:${port + 1003}/pay/cs_test_`))
  await expect(page.getByText(recorded)).toBeVisible()
  await page.getByRole('button', { name: 'Pay' }).click()

  await expect(page).toHaveURL(/\/checkout\/done\?order=GW\d{2}-\d{5}/)
  // Paid; a cylinder cut to order moves it straight on to "Being made". Either way the timeline shows the payment.
  await expect(page.getByTestId('order-status')).toHaveText(/^(Paid|Being made)$/, { timeout: 15_000 })
  await expect(page.getByRole('region', { name: 'Progress' }).getByText('Paid', { exact: true })).toBeVisible()
  await page.screenshot({ path: `${shots}/order-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  const orderNumber = new URL(page.url()).searchParams.get('order')!

  const mail = await expect.poll(async () => {
    const messages = await (await fetch(`${inbox}/api/messages?to=${encodeURIComponent(email)}`)).json() as { subject: string }[]
    return messages.map(m => m.subject)
  }, { timeout: 15_000 })
  await mail.toContain(`Order ${orderNumber} is paid — thank you`)

  // The cart is emptied once the order is paid.
  await page.goto('/cart')
  await expect(page.getByText('Your cart is empty.')).toBeVisible()
})

test('the shop pages are tidy at phone width', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 })
  await page.goto('/cylinders')
  await expect(page.getByText(/cylinders? found/)).toBeVisible()
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/catalogue-phone.png`, fullPage: true })
  await page.locator('article').first().getByRole('heading').getByRole('link').click()
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible()
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/product-phone.png`, fullPage: true })
  const addButton = page.getByRole('button', { name: 'Add to cart' })
  if (await addButton.count()) await addButton.click()
  await page.goto('/cart')
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/cart-phone.png`, fullPage: true })
})

test('the product page carries Product structured data and the sitemap lists it', async ({ page, request }) => {
  await page.goto('/cylinders?kind=recorded')
  await page.locator('article').first().getByRole('heading').getByRole('link').click()
  const data = JSON.parse((await page.locator('script[type="application/ld+json"]').first().textContent())!)
  expect(data['@type']).toBe('Product')
  expect(data.offers.priceCurrency).toBe('USD')
  const slug = new URL(page.url()).pathname.split('/').pop()!
  const sitemap = await (await request.get('/sitemap.xml')).text()
  expect(sitemap).toContain(`/cylinders/${slug}</loc>`)
})
