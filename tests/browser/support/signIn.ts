import { expect, type Browser, type Page } from '@playwright/test'
import { demoAccounts } from '../../../shared/utils/demoAccounts'

/** The site as the browser tests reach it (the address playwright.config.ts gives as baseURL). */
export const site = `http://localhost:${Number(process.env.BROWSER_TEST_PORT ?? 3100)}`

export type DemoRole = 'maker' | 'shipper' | 'collector'

/** The demo account of a role (the seeded shop's sign-ins). */
export function demoAccount(role: DemoRole | string) {
  const account = demoAccounts.find(a => a.role === role)
  if (!account) throw new Error(`no demo account for the role ${role}`)
  return account
}

/**
 * Signs in through the sign-in form as a person would. The submit button is enabled once the page's
 * script has taken over: typed before that, the fields can be reset and the sign-in fails on a loaded
 * machine, so the form is filled only then. Ends when the header names the role.
 */
export async function signIn(page: Page, role: DemoRole | string) {
  const account = demoAccount(role)
  await page.goto('/signin')
  await expect(page.getByRole('button', { name: 'Sign in' })).toBeEnabled()
  await page.getByLabel('E-mail').fill(account.email)
  await page.getByLabel('Password').fill(account.password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByTestId('signed-in-as').first()).toContainText(role)
  return account
}

/** Signs in through the API as the given role; the context keeps the session cookie (this site's Origin, as a page would send). */
async function logIn(request: Page['request'], role: DemoRole | string) {
  const account = demoAccount(role)
  const answer = await request.post('/api/auth/login', { headers: { origin: site }, data: { email: account.email, password: account.password } })
  expect(answer.status(), await answer.text()).toBeLessThan(300)
  return account
}

/**
 * Signs in through the API where the sign-in form is not what is tested: the page's context keeps the
 * cookie. Opens `landing` and ends when its header names the role.
 */
export async function signInThroughApi(page: Page, role: DemoRole | string, landing = '/') {
  const account = await logIn(page.request, role)
  await page.goto(landing)
  await expect(page.getByTestId('signed-in-as').first()).toContainText(role)
  return account
}

/** A new browser context signed in through the API as the role: for a second person beside the test's own page. */
export async function signedInContext(browser: Browser, role: DemoRole | string) {
  const context = await browser.newContext({ baseURL: site })
  await logIn(context.request, role)
  return context
}
