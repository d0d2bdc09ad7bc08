/*
 * GET /api/workshop/bench/reaming?overhang=3/16&target=7/16&perReaming=1/16&setSize=4 (maker)
 * → { reamings, sets, steps: [{ afterReamings, overhangIn }], warnings }
 *
 * Travel still needed = target − measured overhang; one reaming moves the seat about 1/16 in; reamings
 * go in sets, with the fit checked after each. Omitted inputs come from the shop's settings.
 */

/**
 * A blank is about 4 3/16 in long, so no real plan comes near this many reamings; a bigger answer
 * means a mistyped reading, and planning it would only build a huge list of steps.
 */
const MAX_REAMINGS = 100
/** Travel per reaming below this is a slip of the keyboard rather than a light reamer. */
const FINEST_TRAVEL_IN = 1 / 256

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, reamingQuerySchema)
  const settings = await getSetting('engine')
  const targetIn = query.target ?? settings.reaming.targetOverhangIn
  const perReamingIn = query.perReaming ?? settings.reaming.perReamingIn
  if ((targetIn - query.overhang) / perReamingIn > MAX_REAMINGS) {
    const field = query.perReaming !== undefined && query.perReaming < FINEST_TRAVEL_IN ? 'perReaming' : 'overhang'
    throw fieldError(field, `that would take more than ${MAX_REAMINGS} reamings; check the overhang, the target and the travel per reaming`)
  }
  try {
    return benchReaming(query, settings)
  }
  catch (error) {
    // The schema refuses what the engine would; this keeps a case it misses a 400 rather than a 500.
    if (error instanceof RangeError || error instanceof LengthParseError) throw fieldError('overhang', error.message)
    throw error
  }
})
