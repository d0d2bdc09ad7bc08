import { mkdirSync } from 'node:fs'
import { join, resolve } from 'node:path'

// For `npm run backup` on the shop's own machine: it shows the key kept in <data folder>/backup-token, and the
// server (the only process that may open the database) writes the archive into backups/.
export default defineEventHandler(async (event) => {
  if (!backupTokenValid(getRequestHeader(event, 'x-backup-token'))) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'x-backup-token: missing or wrong (it is in backup-token in the data folder, NUXT_DATA_DIR).' })
  }
  const dir = resolve(String(useRuntimeConfig().backupDir))
  mkdirSync(dir, { recursive: true })
  return await writeBackupArchive(join(dir, backupName()))
})
