/*
 * POST /api/custom/fit (public) { script, format: 'two_minute' | 'four_minute', rpm? }
 * → { words, seconds, capacitySeconds, verdict, wordsLeft }
 *
 * The live meter of the custom-message form: spoken words at the shop's speaking rate, plus the
 * lead-in and run-out, against the playing time of the format's recordable length. The schema caps
 * the script's length, so a pasted novel is a 400 on `script`, not a slow request.
 */

/** Longest body worth reading: the longest script in UTF-8 (up to 4 bytes a character) and room for the rest. */
const MAX_BODY_BYTES = CUSTOM_SCRIPT_MAX_CHARS * 4 + 1024

export default defineEventHandler(async (event) => {
  const declared = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (declared > MAX_BODY_BYTES) {
    throw fieldError('script', `script must be at most ${CUSTOM_SCRIPT_MAX_CHARS} characters`)
  }
  const body = await readBodyWith(event, customFitBodySchema)
  const settings = await getSetting('engine')
  try {
    return benchCustomFit(body, settings)
  }
  catch (error) {
    // Only the speed can still trouble the engine once the schema has passed.
    if (error instanceof RangeError) throw fieldError('rpm', error.message)
    throw error
  }
})
