/*
 * GET /api/workshop/bench/reaming?overhang=3/16&target=7/16&perReaming=1/16&setSize=4 (maker)
 * → { reamings, sets, steps: [{ afterReamings, overhangIn }], warnings }
 *
 * Travel still needed = target − measured overhang; one reaming moves the seat about 1/16 in; reamings
 * go in sets, with the fit checked after each. Omitted inputs come from the shop's settings. A plan of
 * more than PLAN_STEPS_MAX reamings comes back with no steps and a warning to check the figures.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, reamingQuerySchema)
  const settings = await getSetting('engine')
  try {
    return benchReaming(query, settings)
  }
  catch (error) {
    // The schema refuses what the engine would; this keeps a case it misses a 400 rather than a 500.
    if (error instanceof RangeError || error instanceof LengthParseError) throw fieldError('overhang', error.message)
    throw error
  }
})
