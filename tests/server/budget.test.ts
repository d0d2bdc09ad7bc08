// Byte budgets of the public pages, read from the build (they do not depend on the machine, unlike
// `npm run bench`): the JavaScript a phone fetches on first load of the catalogue, and that no validation
// library meant for the server (zod) is among it.
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { gzipSync } from 'node:zlib'
import { url } from '@nuxt/test-utils/e2e'
import { describe, expect, it } from 'vitest'
import { rootDir, useTestServer } from './harness'

await useTestServer()

const publicDir = resolve(rootDir, process.env.GW_OUTPUT_DIR ?? '.output', 'public')
// First-load JavaScript of /cylinders, gzip: the goal of 90 KiB, met at 89.2 (pinia out of the first load, the
// page state sent as a script rather than JSON for devalue to revive, no modulepreload polyfill). Of it, the
// entry chunk (Vue, the router, Nuxt's runtime) is 69.5 KiB and useFetch's code, now a chunk of its own, 6.7.
// DEVELOPERS.md › Performance.
const CYLINDERS_JS_BUDGET_KIB = 90
// Strings zod's runtime carries whatever the minifier does to its names.
const zodMarkers = ['ZodError', '$ZodType', '_zod']

/** The scripts a page's HTML makes the browser fetch at once: its module scripts and module preloads. */
async function firstLoadScripts(path: string) {
  const html = await (await fetch(url(path), { headers: { accept: 'text/html' } })).text()
  const found = new Set<string>()
  for (const match of html.matchAll(/<script[^>]*\ssrc="([^"]+)"|<link[^>]*rel="modulepreload"[^>]*href="([^"]+)"|<link[^>]*href="([^"]+)"[^>]*rel="modulepreload"/g)) {
    const src = match[1] ?? match[2] ?? match[3]!
    if (src.startsWith('/_nuxt/')) found.add(src)
  }
  return [...found].map((src) => {
    const bytes = readFileSync(resolve(publicDir, `.${src}`))
    return { src, text: bytes.toString('utf8'), gzip: gzipSync(bytes, { level: 9 }).byteLength }
  })
}

describe('public page budgets', () => {
  it(`/cylinders loads at most ${CYLINDERS_JS_BUDGET_KIB} KiB of JavaScript (gzip) on first load`, async () => {
    const scripts = await firstLoadScripts('/cylinders')
    expect(scripts.length).toBeGreaterThan(0)
    const total = scripts.reduce((sum, script) => sum + script.gzip, 0)
    expect(total / 1024, scripts.map(s => `${s.src} ${(s.gzip / 1024).toFixed(1)} KiB`).join('\n')).toBeLessThanOrEqual(CYLINDERS_JS_BUDGET_KIB)
  })

  it.each(['/', '/cylinders', '/cart'])('no zod in the scripts %s loads at once', async (path) => {
    const scripts = await firstLoadScripts(path)
    const withZod = scripts.filter(script => zodMarkers.some(marker => script.text.includes(marker))).map(script => script.src)
    expect(withZod).toEqual([])
  })
})
