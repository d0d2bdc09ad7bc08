// `npm run backup`: asks the running server (the one process that owns the database) to write a
// consistent snapshot of the database and the uploads to backups/<timestamp>.tar.gz.
import { readFileSync } from 'node:fs'

const port = Number(process.env.PORT ?? 3000)
const base = `http://127.0.0.1:${port}`
const tokenFile = `${process.env.NUXT_DATA_DIR ?? '.data'}/backup-token`
let token
try {
  token = readFileSync(tokenFile, 'utf8').trim()
}
catch {
  console.error(`No ${tokenFile}: start the shop once (npm start) in this folder first, or set NUXT_DATA_DIR as the server has it.`)
  process.exit(1)
}
const response = await fetch(`${base}/api/backup`, { method: 'POST', headers: { 'x-backup-token': token, 'origin': base } }).catch(() => null)
if (!response) {
  console.error(`The shop is not running on ${base}. Start it (npm start), or restore with npm run restore.`)
  process.exit(1)
}
const answer = await response.json()
if (!response.ok) {
  console.error(`Backup failed: ${answer.message ?? response.status}`)
  process.exit(1)
}
console.log(`Backup written: ${answer.file} (${(answer.bytes / 1024 / 1024).toFixed(1)} MB)`)
