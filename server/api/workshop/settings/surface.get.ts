// The maker's limits for surface-test verdicts, with the shop defaults beside them.
import { surfaceThresholdsSchema } from '../../../audio'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  return { thresholds: await getSetting('surface'), defaults: surfaceThresholdsSchema.parse({}) }
})
