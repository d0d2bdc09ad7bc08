/*
 * GET /api/bench/playing-time?length=3.6&tpi=100&rpm=160&diameter=2.19 (public)
 * → { minutes, seconds, surfaceSpeedInPerSec, rotationHz, groovePitchMm }
 *
 * Playing time (min) = recorded length (in) × grooves per inch ÷ rpm; surface speed = π × diameter × rpm ÷ 60.
 * Lengths take what a maker types (3 3/5, 91.44 mm); rpm defaults to the shop's standard speed and the
 * diameter to the standard blank's.
 */

/** Which input an engine refusal is about, read from the engine's own wording. */
function fieldOf(message: string): string {
  if (/diameter/i.test(message)) return 'diameter'
  if (/grooves per inch/i.test(message)) return 'tpi'
  if (/rpm/i.test(message)) return 'rpm'
  return 'length'
}

export default defineEventHandler(async (event) => {
  const query = queryWith(event, playingTimeQuerySchema)
  const settings = await getSetting('engine')
  try {
    return benchPlayingTime(query, settings)
  }
  catch (error) {
    // The schema refuses what the engine would; this keeps a case it misses a 400 rather than a 500.
    if (error instanceof RangeError || error instanceof LengthParseError) throw fieldError(fieldOf(error.message), error.message)
    throw error
  }
})
