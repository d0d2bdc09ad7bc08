// The Content Security Policy (nuxt.config.ts `security`, README "Security") lets every page of the app
// run, style and draw itself: no console message or page error about it on the main pages of each role.
import { expect, test, type Page } from '@playwright/test'
import { awake } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'

/** Collects what the browser says about the policy: console lines, page errors and violation events. */
function watchPolicy(page: Page) {
  const problems: string[] = []
  const aboutPolicy = (text: string) => /Content Security Policy|Refused to/i.test(text)
  page.on('console', (message) => {
    if (aboutPolicy(message.text())) problems.push(`${page.url()} console ${message.type()}: ${message.text()}`)
  })
  page.on('pageerror', (error) => {
    if (aboutPolicy(String(error))) problems.push(`${page.url()} page error: ${String(error)}`)
  })
  // A violation the browser does not print (e.g. reported only) still fires this event.
  void page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (event) => {
      console.error(`Refused to load (Content Security Policy): ${event.violatedDirective} ${event.blockedURI}`)
    })
  })
  return problems
}

/** Opens a page, waits for it to settle (awake, nothing left loading), and checks that the page has its h1. */
async function visit(page: Page, path: string, heading?: string | RegExp) {
  const answer = await page.goto(path)
  expect(answer?.status(), path).toBeLessThan(400)
  await awake(page)
  await page.waitForLoadState('networkidle')
  const h1 = page.getByRole('heading', { level: 1 }).first()
  await expect(h1, path).toBeVisible()
  if (heading) await expect(h1, path).toContainText(heading)
}

/** The font faces the browser has loaded (the self-hosted Fraunces and IBM Plex Sans). */
async function loadedFonts(page: Page): Promise<string[]> {
  return await page.evaluate(async () => {
    await document.fonts.ready
    return [...new Set([...document.fonts].filter(face => face.status === 'loaded').map(face => face.family.replace(/["']/g, '')))]
  })
}

test('a visitor and a collector: shop, product, cart, sign-in and account run under the policy', async ({ page }) => {
  const problems = watchPolicy(page)
  await page.setViewportSize({ width: 1280, height: 900 })
  await visit(page, '/', 'New wax cylinders')
  expect(await loadedFonts(page)).toEqual(expect.arrayContaining(['Fraunces', 'IBM Plex Sans']))
  // Styles from the bundle apply: the body is set in the self-hosted face.
  expect(await page.evaluate(() => getComputedStyle(document.body).fontFamily)).toMatch(/IBM Plex Sans/)
  await visit(page, '/cylinders')
  await expect(page.getByText(/cylinders? found/)).toBeVisible()
  // A product page with its photos and sample, reached by a link (client-side navigation loads more code).
  await page.locator('article').filter({ hasNot: page.getByText('Sold out') }).first().getByRole('heading').getByRole('link').click()
  await expect(page).toHaveURL(/\/cylinders\/[a-z0-9-]+$/)
  await page.waitForLoadState('networkidle')
  const photo = page.locator('main img').first()
  await expect(photo).toBeVisible()
  expect(await photo.evaluate(img => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
  await page.getByRole('button', { name: 'Add to cart' }).click()
  await expect(page.getByText('added to your cart')).toBeVisible()
  await page.screenshot({ path: `${shots}/csp-product.png`, fullPage: true })
  await visit(page, '/cart', 'Your cart')
  await visit(page, '/register')
  await signIn(page, 'collector')
  await visit(page, '/account', 'Your account')
  await page.screenshot({ path: `${shots}/csp-account.png`, fullPage: true })
  expect(problems).toEqual([])
})

test('the maker: dashboard with its charts, bench, blanks, a blank with its label and barcode, recorders, dispatch', async ({ page }) => {
  const problems = watchPolicy(page)
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await visit(page, '/workshop', 'Workshop')
  // The dashboard's charts are drawn on canvases.
  const chart = page.locator('main canvas').first()
  await expect(chart).toBeVisible()
  expect(await chart.evaluate(canvas => (canvas as HTMLCanvasElement).width)).toBeGreaterThan(0)
  await page.screenshot({ path: `${shots}/csp-workshop.png`, fullPage: true })
  // Client-side navigation to the bench.
  await page.getByRole('link', { name: /Bench calculators/ }).first().click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Bench calculators')
  await page.waitForLoadState('networkidle')
  await visit(page, '/workshop/bench', 'Bench calculators')
  await visit(page, '/workshop/blanks', 'Blank register')

  const register = await page.request.get('/api/workshop/blanks')
  expect(register.status()).toBe(200)
  const rows = (await register.json()).rows as { code: string, latestTest: unknown }[]
  const blank = rows.find(row => row.latestTest) ?? rows[0]!
  await visit(page, `/workshop/blanks/${blank.code}`)
  await visit(page, `/workshop/blanks/${blank.code}/label`)
  await expect(page.getByRole('img', { name: `Code 128 barcode of ${blank.code}` })).toBeVisible()
  await page.screenshot({ path: `${shots}/csp-label.png` })

  const recorders = await page.request.get('/api/workshop/recorders')
  const recorder = ((await recorders.json()).recorders as { id: number }[])[0]!
  await visit(page, `/workshop/recorders/${recorder.id}`)
  await visit(page, '/workshop/catalogue')
  await visit(page, '/workshop/orders')
  await visit(page, '/workshop/analyse')
  await visit(page, '/workshop/settings')
  await visit(page, '/dispatch', 'Dispatch')
  expect(problems).toEqual([])
})

test('the shipper\'s dispatch queue runs under the policy', async ({ page }) => {
  const problems = watchPolicy(page)
  await signIn(page, 'shipper')
  await visit(page, '/dispatch', 'Dispatch')
  await expect(page.locator('main address').first()).toBeVisible()
  expect(problems).toEqual([])
})
