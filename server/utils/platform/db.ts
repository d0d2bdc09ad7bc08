import { execFile } from 'node:child_process'
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { pathToFileURL } from 'node:url'
import { promisify } from 'node:util'
import { PGlite } from '@electric-sql/pglite'
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core'
import { drizzle as drizzlePglite } from 'drizzle-orm/pglite'
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator'
import { drizzle as drizzleNodePg } from 'drizzle-orm/node-postgres'
import { migrate as migrateNodePg } from 'drizzle-orm/node-postgres/migrator'
import pg from 'pg'
import * as schema from '../../db/schema'

export { schema }
// The code knows only Drizzle's PostgreSQL base type: the embedded database and a server behave alike.
export type Database = PgDatabase<PgQueryResultHKT, typeof schema>
export type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0]

let closeClient: (() => Promise<void>) | undefined
let embeddedClient: PGlite | undefined
let ready: Promise<Database> | undefined

// Any fixed numbers: every app instance that starts takes this lock before migrating; the others
// are held by withInstanceLock.
const migrationLockKey = 7_310_426_011
const instanceLockKeys = { seed: 7_310_426_012, mail: 7_310_426_013 } as const
let serverPool: pg.Pool | undefined

/**
 * The one database of this process. The first call opens it and applies the migrations; every caller
 * awaits the same promise, so no request runs before the schema is in place. With `DATABASE_URL` set
 * it is a PostgreSQL server through a pool; otherwise the embedded PGlite in `NUXT_DB_DIR`, which only
 * this process may open.
 */
export function useDB(): Promise<Database> {
  if (!ready) {
    ready = process.env.DATABASE_URL ? openServer(process.env.DATABASE_URL) : openEmbedded()
    // A failed start (say, the server was not up yet) is not remembered: the next caller tries again.
    ready.catch(() => {
      ready = undefined
    })
  }
  return ready
}

/**
 * PGlite's start parameters. Its own defaults turn fsync off (-F); a shop's orders need it on. Its default
 * shared_buffers of 160 MB is WebAssembly memory that, once touched, never goes back to the system; a
 * shop's database of a few thousand rows works in 16 MB (a data folder's files are read through the
 * operating system's cache anyway).
 */
function embeddedStartParams(): string[] {
  return [
    ...PGlite.defaultStartParams.filter(param => param !== '-F'),
    '-c', 'fsync=on', '-c', 'synchronous_commit=on', '-c', 'full_page_writes=on',
    '-c', 'shared_buffers=16MB', '-c', 'wal_buffers=1MB',
  ]
}

/**
 * PGlite's package folder, as the server's own imports find it: the nearest node_modules above the entry
 * script (the built server carries its own copy), else above the working folder. The server bundle
 * rewrites import.meta, so neither import.meta.resolve nor import.meta.url can say where the bundle is.
 */
function pgliteFolder(): string {
  for (const start of [process.argv[1] ? dirname(process.argv[1]) : null, process.cwd()]) {
    for (let dir = start; dir; dir = dirname(dir) === dir ? null : dirname(dir)) {
      const candidate = join(dir, 'node_modules', '@electric-sql', 'pglite')
      if (existsSync(join(candidate, 'package.json')) && existsSync(join(candidate, 'dist', 'index.js'))) return candidate
    }
  }
  throw new Error('@electric-sql/pglite was not found beside the server')
}

/**
 * A new data folder is initialised by a child process that exits: initdb inside the server would leave
 * ~450 MB of WebAssembly memory and file-system buffers in its RSS for good (a second PGlite instance runs
 * it, and V8 does not return that memory). The child works in a sibling folder that is renamed into place
 * only when complete, so a crash mid-way leaves no half-made cluster behind the data folder's name.
 */
async function initialiseInChild(dataDir: string): Promise<void> {
  const entry = pathToFileURL(join(pgliteFolder(), 'dist/index.js')).href
  const making = `${dataDir.replace(/\/+$/, '')}.initialising-${process.pid}`
  rmSync(making, { recursive: true, force: true })
  const script = `const { PGlite } = await import(${JSON.stringify(entry)}); const pg = new PGlite(${JSON.stringify(making)}); await pg.waitReady; await pg.close()`
  try {
    await promisify(execFile)(process.execPath, ['--input-type=module', '-e', script])
    rmSync(dataDir, { recursive: true, force: true })
    renameSync(making, dataDir)
  }
  finally {
    rmSync(making, { recursive: true, force: true })
  }
}

async function openEmbedded(): Promise<Database> {
  const config = useRuntimeConfig()
  const dataDir = String(config.dbDir)
  // memory:// (tests, the bench, a throwaway demo) keeps PGlite's in-memory file system and its in-process
  // initdb: a folder on disk would cost ~3 times as long per write under load.
  const inMemory = dataDir.startsWith('memory://')
  if (!inMemory) {
    mkdirSync(dataDir, { recursive: true })
    // A new (empty) data folder is initialised out of process; one holding anything else is left to PGlite.
    if (!existsSync(join(dataDir, 'PG_VERSION')) && readdirSync(dataDir).length === 0) await initialiseInChild(dataDir)
  }
  const client = new PGlite(dataDir, { startParams: embeddedStartParams() })
  const db = drizzlePglite(client, { schema })
  await migratePglite(db, { migrationsFolder: String(config.migrationsDir) })
  embeddedClient = client
  // Beside the data folder: which process owns it, so `npm run restore` refuses while it is open
  // (whatever port the shop serves on). A stale file from a killed process names a dead pid.
  const ownerFile = inMemory ? null : `${dataDir.replace(/\/+$/, '')}.owner`
  if (ownerFile) writeFileSync(ownerFile, JSON.stringify({ pid: process.pid, startedAt: new Date().toISOString() }))
  closeClient = async () => {
    await client.close()
    if (ownerFile) rmSync(ownerFile, { force: true })
  }
  return db as unknown as Database
}

async function openServer(connectionString: string): Promise<Database> {
  const config = useRuntimeConfig()
  const pool = new pg.Pool({ connectionString, max: Number(process.env.DATABASE_POOL_SIZE ?? 10) })
  const lockClient = await pool.connect()
  try {
    // Several instances may start at once: one migrates, the others wait and then find nothing to do.
    await lockClient.query('select pg_advisory_lock($1)', [migrationLockKey])
    await migrateNodePg(drizzleNodePg(lockClient, { schema }), { migrationsFolder: String(config.migrationsDir) })
  }
  finally {
    await lockClient.query('select pg_advisory_unlock($1)', [migrationLockKey]).catch(() => undefined)
    lockClient.release()
  }
  closeClient = () => pool.end()
  serverPool = pool
  return drizzleNodePg(pool, { schema }) as unknown as Database
}

/**
 * Run `work` as the only app instance doing it: on a PostgreSQL server under a session advisory
 * lock (held on one pooled connection), so instances started together seed the demo once and
 * deliver the mail outbox one at a time. With `wait: false` it gives up at once (null) when another
 * instance holds the lock. The embedded database belongs to this process alone, so there it just runs.
 */
export async function withInstanceLock<T>(name: keyof typeof instanceLockKeys, work: () => Promise<T>, options: { wait: boolean } = { wait: true }): Promise<T | null> {
  await useDB()
  if (!serverPool) return await work()
  const key = instanceLockKeys[name]
  const client = await serverPool.connect()
  try {
    if (options.wait) {
      await client.query('select pg_advisory_lock($1)', [key])
    }
    else {
      const { rows } = await client.query<{ locked: boolean }>('select pg_try_advisory_lock($1) as locked', [key])
      if (!rows[0]?.locked) return null
    }
    try {
      return await work()
    }
    finally {
      await client.query('select pg_advisory_unlock($1)', [key]).catch(() => undefined)
    }
  }
  finally {
    client.release()
  }
}

/**
 * A consistent snapshot of the embedded database as a gzipped tarball of its data directory, taken
 * inside this process (PGlite serialises it with the queries). Null when a PostgreSQL server is used:
 * back that up with the server's own tools (pg_dump).
 */
export async function dumpEmbeddedDatabase(): Promise<Uint8Array | null> {
  await useDB()
  if (!embeddedClient) return null
  const dump = await embeddedClient.dumpDataDir('gzip')
  return new Uint8Array(await dump.arrayBuffer())
}

export async function closeDB(): Promise<void> {
  const close = closeClient
  closeClient = undefined
  embeddedClient = undefined
  serverPool = undefined
  ready = undefined
  if (close) await close()
}
