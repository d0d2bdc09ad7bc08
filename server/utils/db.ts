import { mkdirSync } from 'node:fs'
import { PGlite } from '@electric-sql/pglite'
import { drizzle, type PgliteDatabase } from 'drizzle-orm/pglite'
import { migrate } from 'drizzle-orm/pglite/migrator'
import * as schema from '../db/schema'

export { schema }
export type Database = PgliteDatabase<typeof schema>
export type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0]

let client: PGlite | undefined
let ready: Promise<Database> | undefined

/**
 * The one database of this process. PGlite is single-process: only the server opens the data
 * directory. The first call opens it and applies the migrations; every caller awaits the same promise,
 * so no request can run before the schema is in place.
 */
export function useDB(): Promise<Database> {
  ready ??= openDatabase()
  return ready
}

async function openDatabase(): Promise<Database> {
  const config = useRuntimeConfig()
  const dataDir = String(config.dbDir)
  if (!dataDir.startsWith('memory://')) mkdirSync(dataDir, { recursive: true })
  client = new PGlite(dataDir)
  const db = drizzle(client, { schema })
  await migrate(db, { migrationsFolder: String(config.migrationsDir) })
  return db
}

export async function closeDB(): Promise<void> {
  if (!client) return
  const closing = client
  client = undefined
  ready = undefined
  await closing.close()
}
