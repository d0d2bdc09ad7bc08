import { z } from 'zod'

const formatFieldSchema = z.object({ format: z.enum(cylinderFormats, { error: 'format must be two_minute or four_minute' }).optional() })

/**
 * Analyses a surface-test WAV without storing anything (multipart `file`, optional `rpm`), against
 * the shop's `surface` limits; with `format`, also whether the take covers the surface. Too large by its declared size → 413 before the body is read; a file
 * the engine cannot read → its status (400, 413, 415, 422) with its message.
 */
export default defineEventHandler(async (event) => {
  // The body streams in while the role and the shop's limits are looked up.
  const upload = await readUploadFormDuring(event, 'surface_test', Promise.all([requireRole(event, 'maker'), getSetting('surface')]), { required: 'choose the WAV file of the play-through' })
  const [, thresholds] = upload.checked
  // Nothing of the file is kept: its buffer can take the next upload once this answer is out.
  reuseUploadAfterAnswer(event, upload.file)
  const { format, ...fields } = upload.fields
  const { rpm } = surfaceFieldsWith(fields, surfaceAnalyseFieldsSchema)
  const { format: cylinder } = surfaceFieldsWith({ format: format ?? '' }, formatFieldSchema)
  const analysis = await analyseSurfaceUpload(event, upload.file!.data, { rpm, thresholds })
  // Given the format, a take too short to cover the surface is judged incomplete, as on a blank.
  return cylinder ? judgeSurfaceCoverage(analysis, cylinder, rpm, await getSetting('engine'), thresholds) : analysis
})
