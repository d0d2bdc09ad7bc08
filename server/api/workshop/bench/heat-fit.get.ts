/*
 * GET /api/workshop/bench/heat-fit?temperature=95&unit=F&wax=stearic_acid&bore=1.69 (maker)
 * → { referenceTemperatureF, deltaK, linearExpansionPerK, boreGrowthIn, extraTravelIn, taperUnverified,
 *     notes, taperPerFootIn, waxFormulas }
 *
 * How far a blank at this temperature sits from where it sat when its fit was judged: the bore grows by
 * d × (volumetric coefficient ÷ 3) × ΔT and slides further along the taper (a shop setting, marked
 * unverified until the shop has measured its mandrel). The wax formulas come along so the form can
 * offer the shop's own list.
 */

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, heatFitQuerySchema)
  const settings = await getSetting('engine')
  const { taper, waxFormulas } = settings.fit
  if (query.wax !== undefined && !waxFormulas.some(wax => wax.id === query.wax)) {
    throw fieldError('wax', `no wax formula "${query.wax}" in the shop's settings; choose one of ${waxFormulas.map(wax => wax.id).join(', ')}`)
  }
  try {
    return {
      ...benchHeatFit(query, settings),
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
