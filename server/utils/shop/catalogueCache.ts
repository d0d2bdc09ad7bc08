import { sql } from 'drizzle-orm'
import type { Database } from '../platform/db'

/*
 * What the shop shows everyone (the catalogue, a product, the public pages) is computed once and kept
 * while nothing it depends on has changed. "Changed" is asked of the database on every use, in one small
 * query: a digest of every product row (price, stock, title, hidden, photos… all columns) and the time the
 * settings last changed. So a maker's edit, a sale that takes the last one, or a stock count shows on the
 * very next request, whichever code path made it; nothing is ever served stale. Entries also expire after
 * `MAX_AGE_MS` (e.g. for dates a page works out from today), and at most `MAX_ENTRIES` are kept.
 */
const MAX_ENTRIES = 300
const MAX_AGE_MS = 60_000

interface Entry<T> { fingerprint: string, at: number, value: T }
const entries = new Map<string, Entry<unknown>>()
const pending = new Map<string, Promise<unknown>>()

/** A digest of everything public shop answers are made from; different after any product or setting change. */
export async function catalogueFingerprint(db?: Database): Promise<string> {
  const database = db ?? await useDB()
  const result = await database.execute(sql`select
    (select md5(string_agg(p::text, ',' order by p.id)) from products p) as p,
    (select max(updated_at)::text from settings) as s`)
  const row = (result as unknown as { rows: { p: string | null, s: string | null }[] }).rows[0]
  return `${row?.p ?? ''}|${row?.s ?? ''}`
}

/** A kept answer for `key` if it was made under this fingerprint and is young enough. */
export function keptAnswer<T>(key: string, fingerprint: string): T | undefined {
  const entry = entries.get(key)
  if (!entry) return undefined
  if (entry.fingerprint !== fingerprint || Date.now() - entry.at > MAX_AGE_MS) {
    entries.delete(key)
    return undefined
  }
  return entry.value as T
}

export function keepAnswer<T>(key: string, fingerprint: string, value: T) {
  entries.delete(key)
  entries.set(key, { fingerprint, at: Date.now(), value })
  // Oldest first: a Map iterates in insertion order.
  while (entries.size > MAX_ENTRIES) entries.delete(entries.keys().next().value!)
}

/**
 * `compute()`'s answer for `key`, computed again only when the catalogue's fingerprint has moved.
 * Concurrent first requests for one key share one computation.
 */
export async function cachedCatalogueAnswer<T>(key: string, compute: (db: Database) => Promise<T>): Promise<T> {
  const db = await useDB()
  const fingerprint = await catalogueFingerprint(db)
  const kept = keptAnswer<T>(key, fingerprint)
  if (kept !== undefined) return kept
  const flightKey = `${key}\n${fingerprint}`
  let flight = pending.get(flightKey) as Promise<T> | undefined
  if (!flight) {
    flight = compute(db).then((value) => {
      keepAnswer(key, fingerprint, value)
      return value
    }).finally(() => pending.delete(flightKey))
    pending.set(flightKey, flight)
  }
  return await flight
}
