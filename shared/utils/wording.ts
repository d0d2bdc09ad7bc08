/**
 * Counted words and dates in the shop's locale through Intl, so no page writes "ticket(s)" or picks a
 * date order of its own. English has two plural categories (one, other); the rules come from
 * Intl.PluralRules, so a locale with more categories only needs more forms.
 */
const pluralRules = new Map<string, Intl.PluralRules>()

function rulesFor(locale: string): Intl.PluralRules {
  let rules = pluralRules.get(locale)
  if (!rules) {
    rules = new Intl.PluralRules(locale)
    pluralRules.set(locale, rules)
  }
  return rules
}

/** `1 ticket`, `3 tickets`, `0 tickets`; `many` defaults to `one` + "s". */
export function countOf(count: number, one: string, many = `${one}s`, locale = 'en-GB'): string {
  const word = rulesFor(locale).select(count) === 'one' ? one : many
  return `${new Intl.NumberFormat(locale).format(count)} ${word}`
}

/** A calendar day (`2026-12-03`) or an instant, as a date in the shop's locale: `3 Dec 2026`. */
export function formatDay(value: string | Date, locale = 'en-GB', style: 'medium' | 'long' | 'short' = 'medium'): string {
  // A bare date is a calendar day: read and shown at noon UTC so no time zone moves it.
  const date = typeof value === 'string' && value.length === 10 ? new Date(`${value}T12:00:00Z`) : new Date(value)
  return new Intl.DateTimeFormat(locale, { dateStyle: style, timeZone: typeof value === 'string' && value.length === 10 ? 'UTC' : undefined }).format(date)
}

/** An instant with its time: `3 Dec 2026, 14:05`. */
export function formatWhen(value: string | Date, locale = 'en-GB'): string {
  return new Intl.DateTimeFormat(locale, { dateStyle: 'medium', timeStyle: 'short' }).format(new Date(value))
}
