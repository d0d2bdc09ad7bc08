/** The maker's cue sheet for a custom message, as `GET /api/workshop/tickets/{id}/cue-sheet` gives it. */
export interface CueSheet {
  script: string
  words: number | string[]
  marks: { second: number, wordIndex: number }[]
  wordsPerMinute: number
  format: 'two_minute' | 'four_minute'
  rpm: number
  blankCode: string | null
  recorder: string | { id: number, name: string } | null
  occasion: string
  recipientName: string
  wishedDate: string
  voice: 'maker' | 'upload'
  voiceUrl: string | null
}

/** The script's words as the timing marks count them: the script split at white space. */
export function cueWords(sheet: CueSheet): string[] {
  return Array.isArray(sheet.words) ? sheet.words : sheet.script.normalize('NFKC').split(/\s+/u).filter(word => word !== '')
}

/** One ticket's cue sheet (a 404 page when the ticket is not a custom message). */
export async function useCustomCueSheet(id: number) {
  const { data: sheet, error } = await useFetch<CueSheet>(`/api/workshop/tickets/${id}/cue-sheet`, { key: `cue-sheet-${id}` })
  if (error.value) throw createError({ statusCode: 404, statusMessage: 'No cue sheet for this ticket.', fatal: true })
  const recorderName = computed(() => {
    const recorder = sheet.value?.recorder
    return recorder ? (typeof recorder === 'string' ? recorder : recorder.name) : null
  })
  return { sheet, recorderName }
}
