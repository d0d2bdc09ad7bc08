import { readdirSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { defaultEngineSettings } from '../../shared/utils/engineSettings'
import { Client, rootDir, useTestServer } from './harness'

/*
 * The guides are Markdown in content/guides/, bundled into the built server and rendered there: the
 * page's HTML already holds the words (no script needed to read a caution), and every file in the
 * folder is a guide.
 */

await useTestServer()
const visitor = new Client()

async function page(path: string) {
  const answer = await visitor.request<string>(path, { headers: { accept: 'text/html' } })
  // Vue's fragment markers (<!--[-->) are dropped, so a phrase reads as it does on screen.
  return { ...answer, text: String(answer.body).replace(/<!--[[\]]?-->/g, '').replace(/\s+/g, ' ') }
}

const guideFiles = readdirSync(join(rootDir, 'content/guides')).filter(name => name.endsWith('.md')).map(name => name.slice(0, -3))

const expected: Record<string, string[]> = {
  'care': [
    'Let the parcel reach room temperature before you open it',
    'Hold a cylinder by its ends, with a finger or two inside the bore. Never touch the grooves',
    'Stand every cylinder on end, in its box. Never lay a cylinder on its side',
    'Keep them out of direct sun and away from heaters',
    'Let cold wax warm to room temperature before playing it',
    'IASA TC-05',
  ],
  'shipping-and-heat': [
    `at or above <strong>${defaultEngineSettings.heat.cautionHighC} °C</strong>`,
    `at or above <strong>${defaultEngineSettings.heat.holdHighC} °C</strong>`,
    `by <strong>${defaultEngineSettings.heat.stricterPerTransitDayC} °C</strong>`,
    `after <strong>${defaultEngineSettings.dispatch.heatRecheckDays} days</strong>`,
    'the shop&#39;s settings',
    'about 60 °C',
    'early in the week',
    `At least ${defaultEngineSettings.packing.cushioningIn} inches (5 cm) of cushioning on every side`,
    'Double boxed',
    'own padded tube',
  ],
  'workshop-safety': [
    'Never leave a melting pot unattended',
    'Never put water on a wax fire',
    'a fire extinguisher of the right class',
    'Use a thermostatically controlled pot',
    'Ventilate',
    'heat-resistant gloves',
    'Always add caustic to water, never water to caustic.',
    'safety data sheet',
    'Wear a dust mask',
    'never blow dust away with compressed air',
    'Cut away from your body',
    'Keep guards on',
    'Stop the machine before adjusting',
  ],
}

describe('guides', () => {
  it('lists every guide in content/guides with its title and summary', async () => {
    const list = await visitor.get('/api/guides')
    expect(list.status).toBe(200)
    const slugs = (list.body.guides as { slug: string, title: string, summary: string }[]).map(guide => guide.slug)
    expect([...slugs].sort()).toEqual([...guideFiles].sort())
    for (const slug of Object.keys(expected)) expect(slugs).toContain(slug)
    for (const guide of list.body.guides) {
      expect(guide.title.length).toBeGreaterThan(3)
      expect(guide.summary.length).toBeGreaterThan(20)
    }
    const html = await page('/guides')
    expect(html.status).toBe(200)
    for (const guide of list.body.guides) {
      expect(html.text).toContain(`href="/guides/${guide.slug}"`)
    }
  })

  for (const [slug, phrases] of Object.entries(expected)) {
    it(`/guides/${slug} is rendered on the server with its cautions, its sources and the line on local codes`, async () => {
      const html = await page(`/guides/${slug}`)
      expect(html.status).toBe(200)
      expect(html.headers.get('content-type')).toMatch(/text\/html/)
      for (const phrase of phrases) expect(html.text).toContain(phrase)
      expect(html.text).toMatch(/<h2[^>]*>Sources<\/h2>/)
      expect(html.text).toMatch(/local codes and licensed practice come first/i)
      expect(html.text).toContain('href="/guides"')
      // The page keeps the site's policy: scripts by nonce only, nothing evaluated.
      const csp = html.headers.get('content-security-policy') ?? ''
      expect(csp).toMatch(/script-src 'self' 'nonce-[^']+'/)
      expect(csp).not.toContain('unsafe-eval')
    })
  }

  it('renders every guide file, whoever wrote it', async () => {
    for (const slug of guideFiles) {
      const html = await page(`/guides/${slug}`)
      expect(html.status, slug).toBe(200)
      expect(html.text, slug).toMatch(/<h2[^>]*>/)
    }
  })

  it('answers 404 for a guide that does not exist', async () => {
    expect((await visitor.get('/api/guides/no-such-guide')).status).toBe(404)
    expect((await visitor.get('/api/guides/..%2Fpackage')).status).toBe(404)
    expect((await page('/guides/no-such-guide')).status).toBe(404)
  })

  it('the sitemap lists the guides and the message page', async () => {
    const sitemap = await visitor.request<string>('/sitemap.xml')
    expect(sitemap.status).toBe(200)
    for (const path of ['/guides</loc>', '/guides/care</loc>', '/guides/workshop-safety</loc>', '/custom</loc>']) expect(String(sitemap.body)).toContain(path)
  })

  it('robots.txt names the sitemap by the shop\'s address and keeps crawlers out of the private pages', async () => {
    const robots = await visitor.request<string>('/robots.txt')
    expect(robots.status).toBe(200)
    expect(robots.headers.get('content-type')).toMatch(/^text\/plain/)
    const lines = String(robots.body).split('\n')
    // The format: one record for every crawler, a Disallow line per path prefix (RFC 9309, 2.2).
    expect(lines[0]).toBe('User-agent: *')
    for (const path of ['/workshop', '/dispatch', '/account', '/orders', '/api/']) expect(lines).toContain(`Disallow: ${path}`)
    // The cart is a public page (Lighthouse's SEO audit fails a blocked one).
    expect(lines).not.toContain('Disallow: /cart')
    expect(lines).not.toContain('Disallow: /')
    expect(lines).not.toContain('Disallow: /cylinders')
    expect(lines.find(line => line.startsWith('Sitemap: '))).toMatch(/^Sitemap: http:\/\/[^/]+\/sitemap\.xml$/)
  })
})
