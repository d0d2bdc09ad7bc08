/**
 * How long an unpaid checkout holds its stock, and how long its payment page stays open.
 *
 * The payment service refuses a Checkout Session that closes less than 30 minutes after it is made, so
 * a shorter hold (NUXT_CHECKOUT_HOLD_MINUTES below 30) cannot be passed on as the page's own expiry.
 * The hold still follows the setting: the reservation sweep closes the page and gives the stock back
 * once the hold has run out; the page's own expiry is only a backstop at least 30 minutes out.
 */

// The payment service's own bounds for `expires_at`, measured from the session's creation.
export const SESSION_MIN_MINUTES = 30
const SESSION_MAX_MINUTES = 24 * 60
// Between writing the order and creating its session a little time passes, and the two clocks may
// differ; two minutes keeps the page's expiry clear of the 30-minute floor.
const SESSION_MARGIN_MS = 2 * 60_000
// The page outlives the hold by a minute, so the sweep (not the page) decides when the hold ends.
const PAGE_AFTER_HOLD_MS = 60_000

export function parseHoldMinutes(raw: unknown): number {
  const minutes = Number(raw)
  if (!Number.isFinite(minutes) || !Number.isInteger(minutes) || minutes < 1 || minutes > SESSION_MAX_MINUTES - 60) {
    throw new Error(`NUXT_CHECKOUT_HOLD_MINUTES must be a whole number of minutes from 1 to ${SESSION_MAX_MINUTES - 60} (the payment page may stay open at most 24 hours); it is "${String(raw)}".`)
  }
  return minutes
}

/** The configured hold, checked (the server refuses to start with a bad value: see plugins/checkSettings.ts). */
export function checkoutHoldMinutes(): number {
  return parseHoldMinutes(useRuntimeConfig().checkoutHoldMinutes)
}

/**
 * The payment page's `expires_at` (Unix seconds) for an order: a minute after its hold ends, but never
 * sooner than the payment service accepts. Measured from the order's creation rather than from now, so
 * a retried call for the same order sends the same parameters under the same idempotency key.
 */
export function sessionExpiresAt(order: { createdAt: Date, reservationExpiresAt: Date | null }): number {
  const holdEnds = (order.reservationExpiresAt ?? new Date(order.createdAt.getTime() + SESSION_MIN_MINUTES * 60_000)).getTime()
  const earliest = order.createdAt.getTime() + SESSION_MIN_MINUTES * 60_000 + SESSION_MARGIN_MS
  return Math.floor(Math.max(holdEnds + PAGE_AFTER_HOLD_MS, earliest) / 1000)
}
