/*
 * POST /api/custom/quote (public) { script?, voiceSeconds?, format, rpm?, voice, rush, wishedDate? }
 * → { fit, price: { currency, parts, totalMinor }, earliestDate, canOrder, reasons }
 *
 * The order form's quote of a personal message, from the same pure function the checkout charges by
 * (shared/utils/messageQuote.ts). Whatever would stop an order is a reason, not an error; only a body
 * that is not a quote request at all (a script past the cap, an unknown format) is a 400.
 */

/** Longest body worth reading: the longest script in UTF-8 (up to 4 bytes a character) and room for the rest. */
const MAX_BODY_BYTES = CUSTOM_SCRIPT_MAX_CHARS * 4 + 1024

export default defineEventHandler(async (event) => {
  const declared = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (declared > MAX_BODY_BYTES) throw fieldError('script', `script must be at most ${CUSTOM_SCRIPT_MAX_CHARS} characters`)
  const body = await readBodyWith(event, customQuoteBodySchema)
  const quote = quoteCustomMessage(body, shopToday(), await getSetting('engine'))
  return { fit: quote.fit, price: quote.price, earliestDate: quote.earliestDate, canOrder: quote.canOrder, reasons: quote.reasons }
})
