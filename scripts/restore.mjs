// `npm run restore FILE [-- --yes]`: puts a backup back while the shop is stopped. The current database
// and uploads are kept beside the restored ones (…before-restore-<time>), never deleted.
import { existsSync, readFileSync, renameSync, cpSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { createInterface } from 'node:readline/promises'
import { PGlite } from '@electric-sql/pglite'
import { extract } from 'tar'

const args = process.argv.slice(2)
const file = args.find(arg => !arg.startsWith('--'))
const yes = args.includes('--yes')
if (!file || !existsSync(file)) {
  console.error('Usage: npm run restore backups/<timestamp>.tar.gz [-- --yes]')
  process.exit(1)
}
const dbDir = resolve(process.env.NUXT_DB_DIR ?? '.data/db')
const uploadsDir = resolve(process.env.NUXT_UPLOADS_DIR ?? '.data/uploads')
const port = Number(process.env.PORT ?? 3000)

// The server leaves `<db dir>.owner` with its pid while it has the database open (server/utils/platform/db.ts).
function ownerPid() {
  try {
    const { pid } = JSON.parse(readFileSync(`${dbDir}.owner`, 'utf8'))
    process.kill(pid, 0)
    return pid
  }
  catch {
    return null // no file, or its process is gone
  }
}
const owner = ownerPid()
const running = owner !== null || await fetch(`http://127.0.0.1:${port}/api/health`).then(r => r.ok, () => false)
if (running) {
  console.error(`The shop is running${owner !== null ? ` (process ${owner})` : ` on port ${port}`}. Stop it first (Ctrl-C in its terminal): only one process may open the database.`)
  process.exit(1)
}

if (!yes) {
  const prompt = createInterface({ input: process.stdin, output: process.stdout })
  const answer = await prompt.question(`Replace the database in ${dbDir} and the uploads in ${uploadsDir} with ${file}?\nThe current ones are kept beside them. Type "restore" to go on: `)
  prompt.close()
  if (answer.trim() !== 'restore') {
    console.log('Nothing changed.')
    process.exit(0)
  }
}

const work = mkdtempSync(join(tmpdir(), 'gw-restore-'))
const stamp = new Date().toISOString().replace(/[:.]/g, '-')
const moved = []
try {
  await extract({ file, cwd: work })
  if (!existsSync(join(work, 'database.tar.gz'))) throw new Error('this file is not a Groovewright backup (no database.tar.gz inside)')
  // Load into a fresh folder first; the live folders are swapped only once that has worked.
  const loadedDb = join(work, 'db')
  const startParams = [...PGlite.defaultStartParams.filter(param => param !== '-F'), '-c', 'fsync=on']
  const db = new PGlite(loadedDb, { loadDataDir: new Blob([readFileSync(join(work, 'database.tar.gz'))]), startParams })
  const { rows } = await db.query('select count(*)::int as n from orders')
  await db.close()
  for (const dir of [dbDir, uploadsDir]) {
    if (existsSync(dir)) {
      renameSync(dir, `${dir}.before-restore-${stamp}`)
      moved.push(dir)
    }
  }
  mkdirSync(dirname(dbDir), { recursive: true })
  cpSync(loadedDb, dbDir, { recursive: true })
  if (existsSync(join(work, 'uploads'))) cpSync(join(work, 'uploads'), uploadsDir, { recursive: true })
  else mkdirSync(uploadsDir, { recursive: true })
  console.log(`Restored ${file}: ${rows[0].n} orders. Start the shop with npm start.`)
}
catch (error) {
  // Put back whatever was moved aside, so a failed restore leaves the shop as it was.
  for (const dir of moved) {
    rmSync(dir, { recursive: true, force: true })
    renameSync(`${dir}.before-restore-${stamp}`, dir)
  }
  console.error(`Restore failed: ${error instanceof Error ? error.message : error}`)
  process.exitCode = 1
}
finally {
  rmSync(work, { recursive: true, force: true })
}
