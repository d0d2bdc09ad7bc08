import { expect, test } from '@playwright/test'
import { noSeriousAxe, open } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'

test('the home page is tidy at desktop and phone widths, and axe finds nothing serious', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await page.goto('/')
  await expect(page.getByRole('heading', { level: 1 })).toContainText('New wax cylinders')
  await page.screenshot({ path: `${shots}/home-desktop.png`, fullPage: true })
  await noSeriousAxe(page)

  await page.setViewportSize({ width: 390, height: 844 })
  await open(page, '/')
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
  expect(overflow).toBeLessThanOrEqual(0)
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeHidden()
  await page.getByRole('button', { name: 'Menu' }).click()
  await expect(page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Sign in' })).toBeVisible()
  await page.getByRole('button', { name: 'Menu' }).click()
  await page.screenshot({ path: `${shots}/home-phone.png`, fullPage: true })
})

test('a skip link leads the keyboard to the content', async ({ page }) => {
  await page.goto('/')
  await page.keyboard.press('Tab')
  const skip = page.getByRole('link', { name: 'Skip to content' })
  await expect(skip).toBeFocused()
})

const navByRole: Record<string, { shown: string[], hidden: string[] }> = {
  maker: { shown: ['Workshop', 'Dispatch', 'Account'], hidden: [] },
  shipper: { shown: ['Dispatch', 'Account'], hidden: ['Workshop'] },
  collector: { shown: ['Account'], hidden: ['Workshop', 'Dispatch'] },
}

for (const [role, nav] of Object.entries(navByRole)) {
  test(`a ${role} signs in and sees the ${role}'s navigation`, async ({ page }) => {
    await page.setViewportSize({ width: 1280, height: 900 })
    await signIn(page, role)
    const main = page.getByRole('navigation', { name: 'Main' })
    for (const label of nav.shown) await expect(main.getByRole('link', { name: label, exact: true })).toBeVisible()
    for (const label of nav.hidden) await expect(main.getByRole('link', { name: label, exact: true })).toHaveCount(0)
    await page.screenshot({ path: `${shots}/signed-in-${role}.png` })
  })
}

test('a collector sent to the workshop is turned away, and an anonymous visitor is asked to sign in', async ({ page }) => {
  await page.goto('/account')
  await expect(page).toHaveURL(/\/signin\?next=(%2F|\/)account$/)
  await signIn(page, 'collector')
  await page.goto('/workshop')
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Not open to your account')
})

test('registration shows the field that needs fixing, then signs the collector in', async ({ page }) => {
  await page.goto('/register')
  await expect(page.getByRole('button', { name: 'Create account' })).toBeEnabled()
  await page.getByLabel('Your name').fill('Wren Holloway')
  await page.getByLabel('E-mail').fill(`wren-${Date.now()}@collectors.test`)
  await page.getByLabel('Password').fill('password123')
  await page.getByRole('button', { name: 'Create account' }).click()
  await expect(page.getByText('password is one of the commonest passwords')).toBeVisible()
  await page.getByLabel('Password').fill('wax-cylinders-at-dusk')
  await page.getByRole('button', { name: 'Create account' }).click()
  await expect(page).toHaveURL(/\/account$/)
  await expect(page.getByText('Signed in as Wren Holloway')).toBeVisible()
  await page.screenshot({ path: `${shots}/account.png`, fullPage: true })
})

test('the shipper\'s dispatch queue lists what to pack, where it goes and the boxes, with no prices', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 })
  await signIn(page, 'shipper')
  await open(page, '/dispatch')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Dispatch')
  // The demo has one order ready to pack and one packed (invented scenario).
  const ready = page.getByRole('region', { name: /Ready to pack \(\d+\)/ })
  await expect(ready.getByRole('heading', { level: 3 }).first()).toHaveText(/^GW\d{2}-\d{5}$/)
  await expect(ready.locator('address').first()).toBeVisible()
  await expect(ready).toContainText('in a padded tube')
  await expect(ready).toContainText('billed as')
  await expect(page.locator('main')).not.toContainText('$')
  await page.getByTestId('tab-packed').click()
  await expect(page.getByRole('region', { name: /Packed \(\d+\)/ }).locator('li').first()).toBeVisible()
  await expect(page.locator('main')).not.toContainText('$')
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
  await page.screenshot({ path: `${shots}/dispatch-phone.png`, fullPage: true })
  await noSeriousAxe(page)
})
