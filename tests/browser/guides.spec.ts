// The guides (content/guides/): each opens from the list, shows its headings and cautions, links back,
// runs under the site's Content Security Policy, and axe finds nothing serious on it; also at phone width.
import { expect, test, type Page } from '@playwright/test'
import { noSeriousAxe } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'

const guides = [
  { slug: 'care', title: 'Caring for your cylinders', headings: ['When the parcel arrives', 'Handling', 'Playing', 'Storing', 'Sources'], caution: 'Never lay a cylinder on its side' },
  { slug: 'shipping-and-heat', title: 'Shipping and heat', headings: ['Our heat policy', 'Why early in the week', 'How we pack', 'Sources'], caution: 'Do not leave the parcel in a vehicle.' },
  { slug: 'workshop-safety', title: 'Workshop safety', headings: ['Molten wax', 'Hot moulds and warmed blanks', 'Caustic cleaning solutions', 'Wax dust from shaving', 'Sharp reamers and cutters', 'Powered lathes and belts', 'Sources'], caution: 'Never put water on a wax fire' },
]

function watchPolicy(page: Page) {
  const problems: string[] = []
  page.on('console', (message) => {
    if (/Content Security Policy|Refused to|Hydration/i.test(message.text())) problems.push(`${page.url()}: ${message.text()}`)
  })
  page.on('pageerror', error => problems.push(`${page.url()}: ${String(error)}`))
  return problems
}

test('the guides list opens each guide; each shows its headings and cautions and links back', async ({ page }) => {
  const problems = watchPolicy(page)
  await page.setViewportSize({ width: 1280, height: 900 })
  await page.goto('/guides')
  await page.waitForLoadState('networkidle')
  await expect(page.getByRole('heading', { level: 1, name: 'Guides' })).toBeVisible()
  await noSeriousAxe(page)
  for (const guide of guides) {
    await page.goto('/guides')
    await page.getByRole('main').getByRole('link', { name: guide.title }).click()
    await expect(page).toHaveURL(new RegExp(`/guides/${guide.slug}$`))
    await expect(page.getByRole('heading', { level: 1, name: guide.title })).toBeVisible()
    for (const heading of guide.headings) await expect(page.getByRole('heading', { level: 2, name: heading, exact: true })).toBeVisible()
    await expect(page.getByText(guide.caution).first()).toBeVisible()
    await expect(page.getByText(/local codes and licensed practice come first/i).first()).toBeVisible()
    await page.waitForLoadState('networkidle')
    await noSeriousAxe(page, guide.slug)
    await page.getByRole('link', { name: '← All guides' }).first().click()
    await expect(page).toHaveURL(/\/guides$/)
  }
  // The footer links every guide.
  const footer = page.getByRole('navigation', { name: 'Guides' })
  for (const guide of guides) await expect(footer.getByRole('link', { name: guide.title })).toHaveAttribute('href', `/guides/${guide.slug}`)
  expect(problems).toEqual([])
})

test('a guide at phone width: no sideways scrolling, readable, nothing serious for axe', async ({ page }) => {
  const problems = watchPolicy(page)
  await page.setViewportSize({ width: 390, height: 844 })
  await page.goto('/guides/workshop-safety')
  await page.waitForLoadState('networkidle')
  await expect(page.getByRole('heading', { level: 1, name: 'Workshop safety' })).toBeVisible()
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
  await noSeriousAxe(page)
  await page.screenshot({ path: `${shots}/guide-workshop-safety-390.png`, fullPage: true })
  await page.setViewportSize({ width: 1280, height: 900 })
  await page.goto('/guides/care')
  await page.waitForLoadState('networkidle')
  await page.screenshot({ path: `${shots}/guide-care-1280.png`, fullPage: true })
  expect(problems).toEqual([])
})

test('the product page links the care guide; the bench and the batches page link the safety guide', async ({ page }) => {
  await page.goto('/cylinders')
  await page.getByRole('main').getByRole('link').filter({ hasText: /polka|waltz|ballad|blank/i }).first().click()
  await expect(page.getByRole('link', { name: 'the care guide' })).toHaveAttribute('href', '/guides/care')
  await signIn(page, 'maker')
  for (const path of ['/workshop/bench', '/workshop/batches']) {
    await page.goto(path)
    await expect(page.locator('main a[href="/guides/workshop-safety"]').first(), path).toBeVisible()
  }
})
