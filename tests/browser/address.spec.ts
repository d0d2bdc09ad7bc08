import { expect, test } from '@playwright/test'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { awake, open } from './support/page'

// The launcher prints http://localhost:<port> as the shop's address (its default) and the server
// listens on 127.0.0.1. A collector who types the other name must still come back from the payment
// page signed in, with the paid items gone from the cart.
const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const printed = `http://localhost:${port}`
const otherName = `http://127.0.0.1:${port}`

test('opened as 127.0.0.1, the shop moves to the printed address first; the payment round trip keeps the sign-in and empties the cart', async ({ page }) => {
  const collector = demoAccounts.find(a => a.role === 'collector')!
  await page.goto(`${otherName}/signin`)
  await expect(page).toHaveURL(`${printed}/signin`)
  await expect(page.getByRole('button', { name: 'Sign in' })).toBeEnabled()
  await page.getByLabel('E-mail').fill(collector.email)
  await page.getByLabel('Password').fill(collector.password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByTestId('signed-in-as')).toContainText('collector')

  await page.goto(`${otherName}/cylinders?kind=blank`)
  await expect(page).toHaveURL(`${printed}/cylinders?kind=blank`)
  await page.locator('article').filter({ hasNot: page.getByText('Sold out') }).first().getByRole('heading').getByRole('link').click()
  await expect(page).toHaveURL(/\/cylinders\/[a-z0-9-]+$/)
  await awake(page)
  await page.getByRole('button', { name: 'Add to cart' }).click()
  await expect(page.getByText('added to your cart')).toBeVisible()

  await open(page, `${printed}/cart`)
  await page.locator('input[name="name"]').fill('Iris Quillfeather')
  await page.locator('input[name="line1"]').fill('4 Lantern Row')
  await page.getByLabel('Postal code').fill('LM1 7QX')
  await page.getByLabel('Town or city').fill('Lowmere')
  await page.getByLabel('Country').selectOption('US')
  await page.getByRole('button', { name: 'Go to payment' }).click()
  await expect(page).toHaveURL(new RegExp(`:${port + 1003}/pay/cs_test_`))
  await page.getByRole('button', { name: 'Pay' }).click()

  await expect(page).toHaveURL(new RegExp(`^${printed}/checkout/done\\?order=GW\\d{2}-\\d{5}`))
  await expect(page.getByTestId('order-status')).toHaveText(/^(Paid|Being made|Ready to pack)$/, { timeout: 15_000 })
  await expect(page.getByTestId('signed-in-as')).toContainText('collector')
  // The page empties the cart once it has seen the order paid (in the browser, after the page has loaded): the
  // header's count is drawn only once the page is awake, so before that its absence proves nothing.
  await awake(page)
  await expect(page.getByRole('link', { name: /^Cart/ })).not.toHaveAccessibleName(/1 items/)
  await page.goto(`${printed}/cart`)
  await expect(page.getByText('Your cart is empty.')).toBeVisible()
})
