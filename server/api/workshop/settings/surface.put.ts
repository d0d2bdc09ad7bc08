// Change the limits for surface-test verdicts. Tests already stored keep the verdict they were
// given; new analyses use these.
import { surfaceThresholdsSchema } from '../../../audio'

const bodySchema = surfaceThresholdsSchema.unwrap().strict()

export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const input = await readBodyWith(event, bodySchema)
  return { thresholds: await putSetting('surface', input, maker.id), defaults: surfaceThresholdsSchema.parse({}) }
})
