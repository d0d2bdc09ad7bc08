import type { MDCParserResult } from '@nuxtjs/mdc'

/*
 * The guides: Markdown files in content/guides/, bundled into the server's output as server assets
 * (nitro.serverAssets `guides` in nuxt.config.ts), so the built server needs no content/ folder beside
 * it. Each file's name is its address (/guides/<name>); its front-matter gives the title, a one-line
 * summary and its place in the list. Parsed on the server with @nuxtjs/mdc and kept for the life of
 * the process (the files cannot change under a built server).
 */

export interface GuideSummary { slug: string, title: string, summary: string, order: number }
export interface Guide extends GuideSummary { body: MDCParserResult['body'], toc: MDCParserResult['toc'] }

export const guideSlugPattern = /^[a-z0-9]+(?:-[a-z0-9]+)*$/

const parsed = new Map<string, Promise<Guide | null>>()
const guideStorage = () => useStorage('assets:guides')

async function parseGuide(slug: string): Promise<Guide | null> {
  const source = await guideStorage().getItem<string>(`${slug}.md`)
  if (typeof source !== 'string') return null
  const result = await parseMarkdown(source, { highlight: false, toc: { depth: 2, searchDepth: 2 } })
  const data = result.data as Record<string, unknown>
  return {
    slug,
    title: typeof data.title === 'string' ? data.title : slug,
    summary: typeof data.summary === 'string' ? data.summary : '',
    order: typeof data.order === 'number' ? data.order : 100,
    body: result.body,
    toc: result.toc,
  }
}

/** One guide, parsed, or null when there is none of that name. */
export function readGuide(slug: string): Promise<Guide | null> {
  if (!guideSlugPattern.test(slug)) return Promise.resolve(null)
  if (import.meta.dev) return parseGuide(slug)
  let found = parsed.get(slug)
  if (!found) {
    found = parseGuide(slug).catch((error) => {
      parsed.delete(slug)
      throw error
    })
    parsed.set(slug, found)
  }
  return found
}

/** Every guide with its title and summary, in the order their front-matter gives (then by title). */
export async function listGuides(): Promise<GuideSummary[]> {
  const keys = await guideStorage().getKeys()
  const slugs = keys.filter(key => key.endsWith('.md') && !key.includes(':')).map(key => key.slice(0, -3)).filter(slug => guideSlugPattern.test(slug))
  const guides = await Promise.all(slugs.map(readGuide))
  return guides.filter(guide => guide !== null)
    .map(({ slug, title, summary, order }) => ({ slug, title, summary, order }))
    .sort((a, b) => a.order - b.order || a.title.localeCompare(b.title))
}
