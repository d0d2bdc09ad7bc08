/** A ticket's date (a plain day or a moment) as the workshop reads it: "3 Dec 2026"; a dash when there is none. */
export function ticketDay(iso: string | null): string {
  return iso ? new Date(iso.length === 10 ? `${iso}T12:00:00Z` : iso).toLocaleDateString('en-GB', { dateStyle: 'medium' }) : '—'
}

/** A level in dBFS with one decimal and a typographic minus: "−48.2 dBFS". */
export function dbfsLevel(value: number): string {
  return `${value.toFixed(1).replace('-', '−')} dBFS`
}
