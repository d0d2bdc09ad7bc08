/*
 * GET /api/workshop/bench/shaving?high=2.200&low=2.194&wheel=45&min=2.10&perSurface=0.003 (maker)
 * → { infeedIn, passes, diameterAfterIn, surfacesLeft, steps, warnings }
 *
 * 45° of the in-feed wheel feeds the cutter 0.003 in on the radius; a surface is clean once the cut
 * reaches the low spot, (high − low) ÷ 2 deep; each pass takes twice the in-feed off the diameter.
 * `depth` may stand in for `low`; omitted inputs come from the shop's settings.
 */

/** The wall of a standard blank is about 1/4 in: more passes than this cannot be a real plan. */
const MAX_PASSES = 100

export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, shavingQuerySchema)
  const settings = await getSetting('engine')
  const depthIn = query.depth ?? ((query.high - (query.low ?? query.high)) / 2)
  const infeedIn = infeedPerPassIn(query.wheel ?? 45, settings.shaving.infeedPer45DegreesIn)
  if (depthIn / infeedIn > MAX_PASSES) {
    const readings = query.depth !== undefined ? 'depth' : 'low'
    const field = query.wheel !== undefined && query.wheel < 45 ? 'wheel' : readings
    throw fieldError(field, `that would take more than ${MAX_PASSES} passes; check the diameters, the depth and the wheel`)
  }
  try {
    return benchShaving(query, settings)
  }
  catch (error) {
    // The schema refuses what the engine would; this keeps a case it misses a 400 rather than a 500.
    if (error instanceof RangeError || error instanceof LengthParseError) {
      throw fieldError(/high/.test(error.message) ? 'high' : 'low', error.message)
    }
    throw error
  }
})
