import { readFileSync, readdirSync } from 'node:fs'
import { join, relative } from 'node:path'
import { describe, expect, it } from 'vitest'

/*
 * Each life cycle has one owner that writes its state, always through its transition rules and with a
 * log row: orders in server/utils/shop/orders.ts (moveOrder), tickets in server/utils/workshop/tickets.ts,
 * blanks in server/utils/workshop/blanks.ts (changeBlank, moveBlank). Anywhere else, an
 * `update(<table>).set({ <state> })` is a second owner, and this test names the file.
 */
const root = join(import.meta.dirname, '../..')
const owners = [
  { table: 'orders', column: 'status', owner: 'server/utils/shop/orders.ts' },
  { table: 'tickets', column: 'stage', owner: 'server/utils/workshop/tickets.ts' },
  { table: 'blanks', column: 'state', owner: 'server/utils/workshop/blanks.ts' },
]

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap(entry => entry.isDirectory()
    ? sourceFiles(join(dir, entry.name))
    : entry.name.endsWith('.ts') ? [join(dir, entry.name)] : [])
}

/** Each `.update(table).set({ … })` in a text, with the object the set receives (up to its closing brace). */
function stateWrites(text: string, table: string, column: string): string[] {
  const found: string[] = []
  const pattern = new RegExp(`\\.update\\(${table}\\)\\s*\\.set\\(\\{([^}]*)\\}`, 'g')
  for (const match of text.matchAll(pattern)) {
    if (new RegExp(`(^|[\\s,{])${column}\\s*:|\\.\\.\\.`).test(match[1]!)) found.push(match[0].replace(/\s+/g, ' ').slice(0, 120))
  }
  return found
}

describe('one owner per life cycle', () => {
  const files = sourceFiles(join(root, 'server')).map(file => ({ path: relative(root, file), text: readFileSync(file, 'utf8') }))

  it('finds the owners writing (the check can see what it looks for)', () => {
    for (const { table, column, owner } of owners) {
      const text = files.find(file => file.path === owner)!.text
      expect(stateWrites(text, table, column), owner).not.toEqual([])
    }
  })

  it.each(owners)('only $owner writes $table.$column', ({ table, column, owner }) => {
    const elsewhere = files.filter(file => file.path !== owner).flatMap(file => stateWrites(file.text, table, column).map(write => `${file.path}: ${write}`))
    expect(elsewhere).toEqual([])
  })
})
