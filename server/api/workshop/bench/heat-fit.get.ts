import { eq } from 'drizzle-orm'
import { waxBatches } from '../../../db/schema'

/*
 * GET /api/workshop/bench/heat-fit?temperature=95&unit=F&wax=stearic_acid&bore=1.69 (maker)
 *     or …&batchId=3 instead of wax: the figures of one of the workshop's own poured batches
 * → { referenceTemperatureF, deltaK, volumetricExpansionPerK, linearExpansionPerK, boreGrowthIn,
 *     extraTravelIn, taperUnverified, wax, softening, notes, taperPerFootIn, waxFormulas }
 *
 * How far a blank at this temperature sits from where it sat when its fit was judged: the bore grows by
 * d × (volumetric coefficient ÷ 3) × ΔT and slides further along the taper (a shop setting, marked
 * unverified until the shop has measured its mandrel). With a batch, its own measured coefficient is
 * used and its softening point is compared with the temperature. The wax formulas come along so the
 * form can offer the shop's own list. Batches are workshop records: the whole route is the maker's.
 */

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, heatFitQuerySchema)
  const db = await useDB()
  const settings = await getSetting('engine', db)
  const words = await getSetting('units', db)
  const { taper, waxFormulas } = settings.fit
  if (query.wax !== undefined && !waxFormulas.some(wax => wax.id === query.wax)) {
    throw fieldError('wax', `no wax formula "${query.wax}" in the shop's settings; choose one of ${waxFormulas.map(wax => wax.id).join(', ')}`)
  }
  let batch: HeatFitBatch | undefined
  if (query.batchId !== undefined) {
    const [row] = await db.select({
      id: waxBatches.id, code: waxBatches.code, formula: waxBatches.formula,
      volumetricExpansionPerK: waxBatches.volumetricExpansionPerK, softeningPointC: waxBatches.softeningPointC,
    }).from(waxBatches).where(eq(waxBatches.id, query.batchId))
    if (!row) throw createError({ statusCode: 404, statusMessage: 'Not found', message: `batchId: no wax batch has the id ${query.batchId}.`, data: { fields: { batchId: 'no such wax batch' } } })
    batch = row
  }
  try {
    return {
      ...benchHeatFit(query, settings, batch, words),
      taperPerFootIn: taper.perFootIn,
      waxFormulas: waxFormulas.map(({ id, label }) => ({ id, label })),
    }
  }
  catch (error) {
    // The schema refuses what the engine would; this keeps a case it misses a 400 rather than a 500.
    if (error instanceof RangeError) throw fieldError(/wax/.test(error.message) ? 'wax' : 'temperature', error.message)
    throw error
  }
})
