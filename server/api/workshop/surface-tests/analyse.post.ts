/**
 * Analyses a surface-test WAV without storing anything (multipart `file`, optional `rpm`), against
 * the shop's `surface` limits. Too large by its declared size → 413 before the body is read; a file
 * the engine cannot read → its status (400, 413, 415, 422) with its message.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const upload = await readUploadForm(event, 'surface_test', { required: 'choose the WAV file of the play-through' })
  const { rpm } = surfaceFieldsWith(upload.fields, surfaceAnalyseFieldsSchema)
  const thresholds = await getSetting('surface')
  return analyseSurfaceUpload(upload.file!.data, { rpm, thresholds })
})
