import { mkdirSync } from 'node:fs'
import { join, resolve } from 'node:path'

// For `npm run backup` on the shop's own machine: it shows the key kept in .data/backup-token, and the
// server (the only process that may open the database) writes the archive into backups/.
export default defineEventHandler(async (event) => {
  if (!backupTokenValid(getRequestHeader(event, 'x-backup-token'))) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'x-backup-token: missing or wrong (it is in .data/backup-token).' })
  }
  const dir = resolve(process.env.BACKUP_DIR ?? 'backups')
  mkdirSync(dir, { recursive: true })
  return await writeBackupArchive(join(dir, backupName()))
})
