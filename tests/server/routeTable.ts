import { readdirSync } from 'node:fs'
import { join, relative } from 'node:path'
import { rootDir } from './harness'

export interface RouteEntry {
  method: string
  /** The address with each `[param]` left in place, e.g. `/api/workshop/blanks/[code]/reaming`. */
  pattern: string
  /** The parameters in the pattern, in order. */
  params: string[]
  file: string
}

/**
 * The route table, read from the files under `server/<folder>` at test time, so a new route is
 * checked the day it is added: `api/workshop/blanks/[code]/reaming.post.ts` →
 * POST /api/workshop/blanks/[code]/reaming.
 */
export function routeTable(folder: 'api' | 'routes', prefix: string): RouteEntry[] {
  const base = join(rootDir, 'server', folder)
  const files: string[] = []
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      if (entry.isDirectory()) walk(join(dir, entry.name))
      else if (entry.name.endsWith('.ts')) files.push(join(dir, entry.name))
    }
  }
  walk(base)
  return files.sort().map((file) => {
    const name = relative(base, file).replace(/\.ts$/, '')
    const match = /^(.*)\.(get|post|put|patch|delete)$/.exec(name)
    const [route, method] = match ? [match[1]!, match[2]!.toUpperCase()] : [name, 'GET']
    const segments = route.split('/').filter((segment, index, all) => !(segment === 'index' && index === all.length - 1))
    const params = segments.flatMap(segment => [...segment.matchAll(/\[(?:\.\.\.)?([^\]]+)\]/g)].map(found => found[1]!))
    return { method, pattern: [prefix, ...segments].join('/').replace(/\/+/g, '/'), params, file: relative(rootDir, file) }
  })
}

/** The pattern with each parameter replaced by the value `fill` gives for its name. */
export function fillPattern(pattern: string, fill: (param: string) => string): string {
  return pattern.replace(/\[(?:\.\.\.)?([^\]]+)\]/g, (_, param: string) => fill(param))
}
