import AxeBuilder from '@axe-core/playwright'
import { expect, type Page } from '@playwright/test'

/*
 * A page sent by the server is only drawn until its script takes over ("hydration"): what is typed or
 * chosen before that is reset to the page's own state, a click on a plain button does nothing, and submit
 * buttons stay disabled. On a loaded machine that window is long enough to lose a test's first input, so a
 * test waits for the page to be awake before it acts. Where the page has a form, the house signal is its
 * submit button turning enabled (`expect(button).toBeEnabled()`); `awake` is the same wait for any page.
 */

/** Waits until the app has finished hydrating the page (Nuxt's own flag, cleared once everything on it is live). */
export async function awake(page: Page) {
  await page.waitForFunction(() => {
    const root = document.querySelector('#__nuxt') as (Element & { __vue_app__?: { config: { globalProperties: { $nuxt?: { isHydrating?: boolean } } } } }) | null
    return root?.__vue_app__?.config.globalProperties.$nuxt?.isHydrating === false
  })
}

/** Opens a page and waits until it is awake. */
export async function open(page: Page, path: string) {
  await page.goto(path)
  await awake(page)
}

/**
 * Waits until the page is awake and nothing is moving: CSS transitions and animations that end have ended
 * (a button fading in as it turns enabled has not reached its colours yet). Endless ones, like a busy
 * spinner, are left running.
 */
export async function settled(page: Page) {
  await awake(page)
  await page.waitForFunction(() => document.getAnimations().every(animation =>
    animation.playState !== 'running' || animation.effect?.getComputedTiming().endTime === Infinity))
}

/** axe on the settled page: no serious or critical violation, each named by its rule and elements. */
export async function noSeriousAxe(page: Page, where = '') {
  await settled(page)
  const result = await new AxeBuilder({ page }).analyze()
  const serious = result.violations.filter(v => v.impact === 'serious' || v.impact === 'critical')
  expect(serious.map(v => `${v.id}: ${v.nodes.map(n => n.target.join(' ')).join(', ')}`), where).toEqual([])
}
