import { expect, test, type Page } from '@playwright/test'
import sharp from 'sharp'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { noSeriousAxe, open } from './support/page'
import { signIn } from './support/signIn'

const shots = 'tests/browser/report'
const maker = demoAccounts.find(a => a.role === 'maker')!

async function expectNoSidewaysScroll(page: Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
  expect(overflow).toBeLessThanOrEqual(0)
}

/** Thumbnails load lazily: scroll through the page so a full-page screenshot shows them all. */
async function loadAllImages(page: Page) {
  await page.evaluate(async () => {
    for (let y = 0; y < document.body.scrollHeight; y += window.innerHeight / 2) {
      window.scrollTo(0, y)
      await new Promise(resolve => setTimeout(resolve, 50))
    }
    window.scrollTo(0, 0)
  })
  await expect.poll(() => page.evaluate(() => [...document.images].every(image => image.complete && image.naturalWidth > 0))).toBe(true)
}

/** A photo as a camera might give it: a few MB of detail, so the upload takes a moment. */
async function cameraPhoto(): Promise<Buffer> {
  const width = 1600
  const height = 1200
  const pixels = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const at = (y * width + x) * 3
      const grain = ((at * 2654435761) >>> 27) & 0x1f
      pixels[at] = Math.round((x / width) * 200) + grain
      pixels[at + 1] = Math.round((y / height) * 120) + grain
      pixels[at + 2] = 90 + grain
    }
  }
  return await sharp(pixels, { raw: { width, height, channels: 3 } }).png({ compressionLevel: 1 }).toBuffer()
}

test('the maker finds a cylinder, changes its price, adds a photo, and the change is logged', async ({ page }) => {
  const pageErrors: string[] = []
  page.on('pageerror', error => pageErrors.push(error.message))
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await open(page, '/workshop')
  await page.getByRole('link', { name: /^Catalogue/ }).click()
  await expect(page).toHaveURL(/\/workshop\/catalogue$/)
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Catalogue')
  const rows = page.getByTestId('catalogue-row')
  await expect(rows).toHaveCount(16)
  await expect(rows.filter({ hasText: 'Whistling Study No. 3' })).toContainText('Hidden')
  await expect(rows.filter({ hasText: 'Reel for a Cracked Mandrel' })).toContainText('Sold out')
  await loadAllImages(page)
  await page.screenshot({ path: `${shots}/catalogue-list-desktop.png`, fullPage: true })
  await noSeriousAxe(page, 'list')

  await page.getByRole('searchbox', { name: 'Search' }).fill('tallow')
  await page.getByRole('button', { name: 'Search' }).click()
  await expect(page).toHaveURL(/q=tallow/)
  await expect(rows).toHaveCount(1)
  await page.getByRole('link', { name: 'Tallow Yard Two-Step', exact: true }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Tallow Yard Two-Step')

  const price = page.getByLabel('Price (USD)')
  await expect(price).toHaveValue('34.00')
  await price.fill('36.50')

  const previews = page.getByTestId('photo-preview')
  await expect(previews).toHaveCount(2)
  await page.getByLabel('Add a photo').setInputFiles({ name: 'bench-shot.png', mimeType: 'image/png', buffer: await cameraPhoto() })
  const progress = page.getByRole('progressbar', { name: 'Upload of bench-shot.png' })
  await expect(progress).toBeVisible()
  await expect(progress).toHaveAttribute('aria-valuenow', '100')
  await expect(page.getByText('Uploaded bench-shot.png. Save the product to keep it.')).toBeVisible()
  await expect(previews).toHaveCount(3)
  await expect.poll(() => previews.nth(2).evaluate(image => (image as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)

  await page.getByRole('button', { name: 'Save changes' }).click()
  await expect(page.getByText('Saved Tallow Yard Two-Step. The change is in the log below.')).toBeVisible()
  const log = page.getByRole('region', { name: 'Change log' })
  await expect(log.getByTestId('change-entry').filter({ hasText: 'Price: $34.00 → $36.50' })).toContainText(maker.name)
  await page.screenshot({ path: `${shots}/catalogue-edit-desktop.png`, fullPage: true })
  await noSeriousAxe(page, 'edit')

  // Kept: after a reload the new price and the third photo are still there.
  await page.setViewportSize({ width: 390, height: 844 })
  await page.reload()
  await expect(page.getByLabel('Price (USD)')).toHaveValue('36.50')
  await expect(previews).toHaveCount(3)
  await expectNoSidewaysScroll(page)
  await page.screenshot({ path: `${shots}/catalogue-edit-phone.png`, fullPage: true })
  await noSeriousAxe(page, 'edit, phone')

  await page.goto('/workshop/catalogue')
  await expect(rows).toHaveCount(16)
  await expectNoSidewaysScroll(page)
  await loadAllImages(page)
  await page.screenshot({ path: `${shots}/catalogue-list-phone.png`, fullPage: true })
  await noSeriousAxe(page, 'list, phone')
  expect(pageErrors).toEqual([])
})

test('a new product: the form names what is missing, then creates it', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signIn(page, 'maker')
  await open(page, '/workshop/catalogue/new')
  await page.getByRole('button', { name: 'Create product' }).click()
  await expect(page.getByText('Please correct the marked fields.')).toBeVisible()
  await expect(page.getByText('title needs at least 2 characters')).toBeVisible()
  await expect(page.getByText('performer is required for a recorded cylinder')).toBeVisible()
  await expect(page.getByLabel('Title')).toBeFocused()
  await page.screenshot({ path: `${shots}/catalogue-new-errors-desktop.png`, fullPage: true })
  await noSeriousAxe(page, 'new, with errors')

  await page.getByLabel('Title').fill('Chandler\'s Hornpipe')
  await expect(page.getByLabel('Address in the shop (slug)')).toHaveValue('chandlers-hornpipe')
  await page.getByLabel('Material').fill('Stearic acid wax (hard, black)')
  await page.getByLabel('Performer').fill('The Fennel Street Players')
  await page.getByLabel('Running time (m:ss)').fill('2:40')
  await page.getByLabel('Price (USD)').fill('31')
  await page.getByLabel('In stock').fill('4')
  await page.getByRole('button', { name: 'Create product' }).click()
  // 2:40 is more than a 2-minute surface holds at 160 rpm (2:15).
  await expect(page.getByText(/running time 2:40 is longer than a 2-minute surface holds at 160 rpm \(2:15\)/)).toBeVisible()
  await page.getByLabel('Speed').selectOption('120')
  await page.getByRole('button', { name: 'Create product' }).click()
  await expect(page).toHaveURL(/\/workshop\/catalogue\/\d+$/)
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Chandler\'s Hornpipe')
  await expect(page.getByRole('region', { name: 'Change log' })).toContainText('set to $31.00')
})
