import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'

/*
 * Every setting the code reads is in the README's configuration table, and every variable the table
 * names is read somewhere. Settings are read two ways: `process.env.NAME` in the server, the scripts and
 * the stand-ins, and Nuxt's runtime config, whose keys are set with NUXT_<KEY> (nested keys joined by _,
 * camelCase as UPPER_SNAKE: `public.surfaceTestMaxMb` is NUXT_PUBLIC_SURFACE_TEST_MAX_MB).
 */
const root = join(import.meta.dirname, '../..')

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap(entry => entry.isDirectory()
    ? (entry.name === 'node_modules' ? [] : sourceFiles(join(dir, entry.name)))
    : /\.(ts|mjs|vue)$/.test(entry.name) ? [join(dir, entry.name)] : [])
}

/** Runtime-config keys that are not settings of their own, and why. */
const notSettings: Record<string, string> = {
  NUXT_MIGRATIONS_DIR: 'fixed at build time: the drizzle/ folder bundled with the server',
  NUXT_PUBLIC_SITE_URL: 'taken from NUXT_SITE_URL on every request (one setting for the address)',
}

const upperSnake = (key: string) => key.replace(/([a-z0-9])([A-Z])/g, '$1_$2').toUpperCase()

function runtimeConfigNames(config: Record<string, unknown>, prefix = 'NUXT'): string[] {
  return Object.entries(config).flatMap(([key, value]) => {
    const name = `${prefix}_${upperSnake(key)}`
    // nuxt-auth-utils' session options: only the password is set from outside.
    if (name === 'NUXT_SESSION') return ['NUXT_SESSION_PASSWORD']
    return value !== null && typeof value === 'object' && !Array.isArray(value) ? runtimeConfigNames(value as Record<string, unknown>, name) : [name]
  })
}

function documentedNames(): string[] {
  const readme = readFileSync(join(root, 'README.md'), 'utf8')
  const section = readme.slice(readme.indexOf('## Configuration'))
  const table = section.slice(0, section.indexOf('\n## '))
  const names = new Set<string>()
  for (const line of table.split('\n').filter(row => row.startsWith('| `'))) {
    const firstCell = line.split('|')[1]!
    for (const match of firstCell.matchAll(/`([A-Z][A-Z0-9_]+)`/g)) names.add(match[1]!)
  }
  return [...names]
}

async function readNames(): Promise<string[]> {
  const names = new Set<string>()
  const files = ['server', 'shared', 'app', 'scripts', 'fakes'].flatMap(dir => sourceFiles(join(root, dir))).concat(join(root, 'nuxt.config.ts'))
  for (const file of files) {
    for (const match of readFileSync(file, 'utf8').matchAll(/process\.env\.([A-Z][A-Z0-9_]+)|process\.env\[['"]([A-Z][A-Z0-9_]+)['"]\]/g)) {
      names.add(match[1] ?? match[2]!)
    }
  }
  const globals = globalThis as { defineNuxtConfig?: unknown }
  globals.defineNuxtConfig = (config: unknown) => config
  const { default: nuxtConfig } = await import('../../nuxt.config') as unknown as { default: { runtimeConfig: Record<string, unknown> } }
  for (const name of runtimeConfigNames(nuxtConfig.runtimeConfig)) names.add(name)
  for (const name of Object.keys(notSettings)) names.delete(name)
  // Set by Node or the shell for everyone, not by this project.
  for (const name of ['NODE_ENV', 'CI']) names.delete(name)
  return [...names].sort()
}

describe('every setting is documented', () => {
  it('finds settings both ways (the check can see what it looks for)', async () => {
    const names = await readNames()
    expect(names).toContain('DATABASE_URL')
    expect(names).toContain('NUXT_PUBLIC_SURFACE_TEST_MAX_MB')
    expect(documentedNames()).toContain('NUXT_SESSION_PASSWORD')
  })

  it('the README\'s configuration table names every variable the code reads', async () => {
    const documented = new Set(documentedNames())
    const missing = (await readNames()).filter(name => !documented.has(name))
    expect(missing, `read by the code but not in README › Configuration: ${missing.join(', ')}`).toEqual([])
  })

  it('and names none that nothing reads', async () => {
    const read = new Set(await readNames())
    const stale = documentedNames().filter(name => !read.has(name))
    expect(stale, `in README › Configuration but read nowhere: ${stale.join(', ')}`).toEqual([])
  })
})
