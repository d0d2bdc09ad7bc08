import { formatDay } from '#shared/utils/wording'

/**
 * A ticket's date (a plain day or a moment) as the workshop reads it, in the shop's locale (`useUnits().prefs`):
 * "3 Dec 2026" or "Dec 3, 2026"; a dash when there is none.
 */
export function ticketDay(iso: string | null, locale?: string): string {
  return iso ? formatDay(iso, locale) : '—'
}

/** A level in dBFS with one decimal and a typographic minus: "−48.2 dBFS". */
export function dbfsLevel(value: number): string {
  return `${value.toFixed(1).replace('-', '−')} dBFS`
}
