import { createReadStream } from 'node:fs'
import { create as contentDisposition } from 'content-disposition'
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

// The maker downloads a backup of the whole shop (database and uploaded files) from the settings page.
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const dir = await mkdtemp(join(tmpdir(), 'gw-download-'))
  const name = backupName()
  try {
    const { file, bytes } = await writeBackupArchive(join(dir, name))
    setResponseHeader(event, 'content-type', 'application/gzip')
    setResponseHeader(event, 'content-length', bytes)
    setResponseHeader(event, 'content-disposition', contentDisposition(`groovewright-${name}`))
    setResponseHeader(event, 'cache-control', 'no-store')
    const stream = createReadStream(file)
    stream.on('close', () => void rm(dir, { recursive: true, force: true }))
    return sendStream(event, stream)
  }
  catch (error) {
    await rm(dir, { recursive: true, force: true })
    throw error
  }
})
