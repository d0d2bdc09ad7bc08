import { randomBytes, timingSafeEqual } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { mkdir, mkdtemp, rename, rm, stat, symlink, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { create as createTar } from 'tar'

/**
 * Writes one backup archive to `target`: `database.tar.gz` (the embedded database's data directory,
 * dumped by the server process itself), the `uploads/` folder, and `manifest.json`. The archive is
 * streamed to disk file by file, never held whole in memory, and appears under its name only when complete.
 */
export async function writeBackupArchive(target: string): Promise<{ file: string, bytes: number }> {
  const database = await dumpEmbeddedDatabase()
  if (!database) {
    throw conflictError('This shop runs on a PostgreSQL server: back it up with pg_dump, and the uploads with the tools of the storage they live in (an S3-compatible bucket\'s versioning or a sync to another bucket).')
  }
  const work = await mkdtemp(join(tmpdir(), 'gw-backup-'))
  try {
    await writeFile(join(work, 'database.tar.gz'), database)
    // Uploads in an S3-compatible bucket (NUXT_UPLOADS_DRIVER=s3) or another shared mount (`build`) are not
    // copied here: back the bucket up with its own tools (versioning, replication, a sync to another bucket).
    const localUploads = uploadsOnLocalDisk()
    const uploadsNote = localUploads ? 'the uploads folder' : `not included: uploads live in shared storage (NUXT_UPLOADS_DRIVER=${uploadsDriver()}); back that bucket up with its own tools`
    await writeFile(join(work, 'manifest.json'), JSON.stringify({ createdAt: new Date().toISOString(), format: 1, contents: ['database.tar.gz', 'uploads/'], uploadsIncluded: localUploads, uploads: uploadsNote }, null, 2))
    const uploads = resolve(String(useRuntimeConfig().uploadsDir))
    if (localUploads && existsSync(uploads)) await symlink(uploads, join(work, 'uploads'), 'dir')
    else await mkdir(join(work, 'uploads'))
    const partial = `${target}.partial`
    await createTar({ gzip: true, file: partial, cwd: work, portable: true, follow: true }, ['manifest.json', 'database.tar.gz', 'uploads'])
    await rename(partial, target)
    return { file: target, bytes: (await stat(target)).size }
  }
  finally {
    await rm(work, { recursive: true, force: true })
  }
}

export function backupName(): string {
  return `${new Date().toISOString().replace(/[:.]/g, '-')}.tar.gz`
}

/** The key `npm run backup` shows the server: kept in the data folder, readable only by whoever runs the shop. */
export function backupToken(): string {
  const dir = resolve(String(useRuntimeConfig().dataDir))
  const file = resolve(dir, 'backup-token')
  if (!existsSync(file)) {
    mkdirSync(dir, { recursive: true })
    writeFileSync(file, randomBytes(24).toString('hex'), { mode: 0o600 })
  }
  return readFileSync(file, 'utf8').trim()
}

export function backupTokenValid(given: string | undefined): boolean {
  if (!given) return false
  const expected = Buffer.from(backupToken())
  const candidate = Buffer.from(given)
  return expected.length === candidate.length && timingSafeEqual(expected, candidate)
}
