/** A certificate's date in words ("3 December 2026"); a bare day is read at noon UTC so it never slips. */
export const certificateDay = (iso: string | null | undefined) => iso ? new Date(iso.length === 10 ? `${iso}T12:00:00Z` : iso).toLocaleDateString('en-GB', { dateStyle: 'long' }) : '—'

/** A level in dBFS with a true minus sign. */
export const formatDbfs = (value: number) => `${value.toFixed(1).replace('-', '−')} dBFS`

export const certificateVerdictWords = { pass: 'pass', marginal: 'marginal', fail: 'fail', incomplete: 'incomplete (the take did not cover the surface)' } as const
