import { expect, test, type Page } from '@playwright/test'
import { awake, noSeriousAxe, open } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'
const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const inbox = `http://127.0.0.1:${port + 1002}`

async function addFirstInStock(page: Page, kind: 'recorded' | 'blank') {
  await open(page, `/cylinders?kind=${kind}`)
  const cards = page.locator('article').filter({ hasNot: page.getByText('Sold out') })
  await cards.first().getByRole('heading').getByRole('link').click()
  await expect(page).toHaveURL(/\/cylinders\/[a-z0-9-]+$/)
  await awake(page)
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

  await open(page, '/cart')
  await expect(page.getByRole('link', { name: recorded })).toBeVisible()
  await expect(page.getByRole('link', { name: blank })).toBeVisible()
  await expect(page.getByTestId('cart-total')).toContainText('$')
  const email = `guest-${Date.now()}@collectors.test`
  await fillAddress(page, email)
  // The shop decides the zone and the tax from the address: abroad, then at home in the home state, then elsewhere at home.
  await page.getByLabel('Country').selectOption('DE')
  await expect(page.getByTestId('cart-place')).toContainText('Ships as Rest of the world; No sales tax collected')
  await page.getByLabel('Country').selectOption('US')
  await page.getByLabel('State or region').fill('TX')
  await expect(page.getByTestId('cart-place')).toContainText('Ships as Domestic; Home state sales tax 8.25 %')
  await page.getByLabel('State or region').fill('OR')
  await expect(page.getByTestId('cart-place')).toContainText('Ships as Domestic; No sales tax collected')
  await page.screenshot({ path: `${shots}/cart-desktop.png`, fullPage: true })
  await noSeriousAxe(page)
  await page.getByRole('button', { name: 'Go to payment' }).click()

  await expect(page).toHaveURL(new RegExp(`127\\.0\\.0\\.1:${port + 1003}/pay/cs_test_`))
  await expect(page.getByText(recorded)).toBeVisible()
  await page.getByRole('button', { name: 'Pay' }).click()

  await expect(page).toHaveURL(/\/checkout\/done\?order=GW\d{2}-\d{5}/)
  // Paid; a cylinder cut to order moves it straight on to "Being made". Either way the timeline shows the payment.
  await expect(page.getByTestId('order-status')).toHaveText(/^(Paid|Being made|Ready to pack)$/, { timeout: 15_000 })
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
  await awake(page)
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/product-phone.png`, fullPage: true })
  const addButton = page.getByRole('button', { name: 'Add to cart' })
  if (await addButton.count()) await addButton.click()
  await page.goto('/cart')
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/cart-phone.png`, fullPage: true })
})

async function fillAddress(page: Page, email: string) {
  await page.getByLabel('E-mail').fill(email)
  await page.locator('input[name="name"]').fill('Wren Holloway')
  await page.locator('input[name="line1"]').fill('9 Quill Lane')
  await page.getByLabel('Postal code').fill('LM2 4AB')
  await page.getByLabel('Town or city').fill('Lowmere')
  await page.getByLabel('Country').selectOption('US')
}

const noSideways = async (page: Page) => expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)

test('at phone width: cancelling on the payment page gives the order up; paying shows a tidy order page, for the customer and the maker', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 })
  const blank = await addFirstInStock(page, 'blank')
  await open(page, '/cart')
  await expect(page.getByRole('link', { name: blank })).toBeVisible()
  await expect(page.getByText(/We hold your cylinders for \d+ (minutes|hours)/)).toBeVisible()
  await fillAddress(page, `phone-${Date.now()}@collectors.test`)

  // Cancel on the payment page: back in the cart, the order is given up and the cart kept.
  // The answer is read on its way through: the page navigates away before its body could be asked for.
  let given = { orderNumber: '', accessToken: '' }
  await page.route('**/api/checkout', async (route) => {
    const response = await route.fetch()
    given = await response.json()
    await route.fulfill({ response })
  })
  await page.getByRole('button', { name: 'Go to payment' }).click()
  await expect(page).toHaveURL(new RegExp(`127\\.0\\.0\\.1:${port + 1003}/pay/cs_test_`))
  await page.getByRole('button', { name: 'Cancel' }).click()
  await page.unroute('**/api/checkout')
  expect(given.orderNumber).toMatch(/^GW\d{2}-\d{5}$/)
  await expect(page).toHaveURL(new RegExp(`/cart\\?cancelled=${given.orderNumber}`))
  await expect(page.getByTestId('cancelled-order')).toContainText(`order ${given.orderNumber} is cancelled and nothing was charged`)
  // The signed link's token is dropped from the address once it has been used.
  await expect(page).not.toHaveURL(/[?&]t=/)
  await expect(page.getByRole('link', { name: blank })).toBeVisible()
  await noSideways(page)
  await page.screenshot({ path: `${shots}/cart-cancelled-phone.png`, fullPage: true })
  await noSeriousAxe(page)
  const abandoned = await page.request.get(`/api/orders/${given.orderNumber}?t=${given.accessToken}`)
  expect((await abandoned.json()).status).toBe('cancelled')

  // Checking out again holds the items afresh; this time the customer pays.
  await fillAddress(page, `phone-${Date.now()}@collectors.test`)
  await page.getByRole('button', { name: 'Go to payment' }).click()
  await expect(page).toHaveURL(new RegExp(`127\\.0\\.0\\.1:${port + 1003}/pay/cs_test_`))
  await page.getByRole('button', { name: 'Pay' }).click()
  await expect(page).toHaveURL(/\/checkout\/done\?order=GW\d{2}-\d{5}/)
  await expect(page.getByTestId('order-status')).toHaveText(/^(Paid|Being made|Ready to pack)$/, { timeout: 15_000 })
  const paid = new URL(page.url())
  const orderNumber = paid.searchParams.get('order')!
  expect(orderNumber).not.toBe(given.orderNumber)
  await page.goto(`/orders/${orderNumber}?t=${paid.searchParams.get('t')}`)
  await expect(page.getByTestId('order-status')).toHaveText(/^(Paid|Being made|Ready to pack)$/)
  await noSideways(page)
  await page.screenshot({ path: `${shots}/order-phone.png`, fullPage: true })
  await noSeriousAxe(page)

  // The maker's view of the same order, with the refund form choosing what goes back on sale.
  await signIn(page, 'maker')
  await page.goto(`/workshop/orders/${orderNumber}`)
  await expect(page.getByRole('heading', { name: 'Refund' })).toBeVisible()
  await expect(page.getByRole('group', { name: 'Back on sale' }).getByLabel(blank)).toBeVisible()
  await noSideways(page)
  await page.screenshot({ path: `${shots}/workshop-order-phone.png`, fullPage: true })
  await noSeriousAxe(page)
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

test('a bare ?cancelled= link gives nothing up by itself: it only offers the button', async ({ page }) => {
  const calls: string[] = []
  page.on('request', (request) => {
    if (request.method() === 'POST' && request.url().includes('/cancel')) calls.push(request.url())
  })
  await page.goto('/cart?cancelled=GW26-01003')
  const notice = page.getByTestId('cancelled-order')
  await expect(notice).toContainText('was not paid')
  await expect(notice.getByRole('button', { name: 'Give up this order and release the items' })).toBeVisible()
  await page.waitForTimeout(500)
  expect(calls).toEqual([])
})
