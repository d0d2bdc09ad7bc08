import { eq } from 'drizzle-orm'
import { blanks } from '../../db/schema'
import type { Database } from '../platform/db'

/**
 * The maker's cue sheet for a personal message: the script word by word, a timing mark every 15 s of
 * speech at the shop's speaking rate (counted after the lead-in), the format and speed, the ticket's
 * blank, the recorder to cut with (the in-service one with the best recent test cuts), the wishes and
 * the customer's own recording when they sent one. 404 for a ticket that carries no message.
 */
export async function ticketCueSheet(db: Database, ticketId: number) {
  const row = await ticketMessage(db, ticketId)
  if (!row?.message) throw notFoundError('No personal message on this ticket.')
  const { ticket, item, message } = row
  const settings = await getSetting('engine', db)
  const cue = messageCueMarks(message.script, settings)
  const [blank] = ticket.blankId ? await db.select({ code: blanks.code }).from(blanks).where(eq(blanks.id, ticket.blankId)) : []
  const recorder = suggestedRecorder(await rankRecorders(db))
  return {
    script: message.script,
    words: cue.words,
    marks: cue.marks,
    wordsPerMinute: settings.speech.wordsPerMinute,
    leadInSeconds: settings.speech.leadInSeconds,
    format: item.format,
    rpm: message.rpm,
    blankCode: blank?.code ?? null,
    recorder: recorder ? { id: recorder.id, name: recorder.name } : null,
    occasion: message.occasion,
    recipientName: message.recipientName,
    wishedDate: message.wishedDate,
    voice: message.voice,
    voiceSeconds: message.voiceSeconds,
    voiceUrl: message.voiceFileId ? storedFileUrl(message.voiceFileId) : null,
  }
}

/** What the maker's ticket answers show of a message: the wished-for date and how the script fits. */
export function messageSummaryForTicket(message: { wishedDate: string, quote: Record<string, unknown>, voice: string } | null) {
  if (!message) return null
  const fit = (message.quote as { fit?: { verdict?: string, seconds?: number } }).fit
  return { wishedDate: message.wishedDate, voice: message.voice, fit: fit ? { verdict: fit.verdict ?? null, seconds: fit.seconds ?? null } : null }
}
