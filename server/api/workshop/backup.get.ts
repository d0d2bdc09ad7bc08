// The maker downloads a backup of the whole shop (database and uploaded files) from the settings page.
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const backup = await createBackupArchive()
  setResponseHeader(event, 'content-type', 'application/gzip')
  setResponseHeader(event, 'content-disposition', `attachment; filename="groovewright-${backup.name}"`)
  setResponseHeader(event, 'cache-control', 'no-store')
  return backup.bytes
})
