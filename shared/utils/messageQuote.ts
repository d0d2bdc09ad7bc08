import type { CylinderFormat } from './cylinder'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'
import { countSpokenWords, messageFitForFormat } from './messageFit'
import type { MessageFitVerdict } from './messageFit'

/*
 * The quote of a personal message: how it sits on the record, what it costs and the earliest date the
 * shop can promise. One pure function, so the order form shows the same answer the checkout charges.
 */

export type MessageVoice = 'maker' | 'upload'
export type MessagePricePartId = 'base' | 'extra_time' | 'four_minute' | 'rush'

export interface MessageQuoteInput {
  script?: string | undefined
  /** The customer's recording, measured (voice `upload`): it replaces the script's spoken time. */
  voiceSeconds?: number | undefined
  format: CylinderFormat
  rpm?: number | undefined
  voice: MessageVoice
  rush: boolean
  /** YYYY-MM-DD. */
  wishedDate?: string | undefined
}

export interface MessageQuote {
  fit: { words: number, seconds: number, capacitySeconds: number, verdict: MessageFitVerdict, wordsLeft: number }
  /** Seconds of speech the price is reckoned on (no lead-in or run-out). */
  spokenSeconds: number
  price: { currency: string, parts: { id: MessagePricePartId, label: string, amountMinor: number }[], totalMinor: number }
  earliestDate: string
  canOrder: boolean
  reasons: { field: string, message: string }[]
}

const SLACK = 1e-9
const round1 = (value: number) => Math.round(value * 10) / 10

/** The calendar date `days` after a YYYY-MM-DD date. */
export function addDaysToDate(date: string, days: number): string {
  const at = new Date(`${date}T00:00:00Z`)
  return new Date(at.getTime() + days * 86_400_000).toISOString().slice(0, 10)
}

/** Today's date in the shop's calendar (UTC). */
export function shopToday(now: Date = new Date()): string {
  return now.toISOString().slice(0, 10)
}

/** Days from payment to the earliest date the shop promises: the rush lead time or the usual one. */
export function messageLeadTimeDays(rush: boolean, settings: EngineSettings = defaultEngineSettings): number {
  return rush ? settings.custom.rushLeadTimeDays : settings.production.leadTimeDays
}

/**
 * Price parts of a message: the base covers `includedSeconds` of speech; each started 30 s beyond
 * adds `perExtra30sMinor`; the 4-minute format and a rush add their surcharges.
 */
export function messagePriceParts(format: CylinderFormat, spokenSeconds: number, rush: boolean, settings: EngineSettings = defaultEngineSettings) {
  const prices = settings.prices.customMessage
  const parts: MessageQuote['price']['parts'] = [{ id: 'base', label: `Personal message (up to ${prices.includedSeconds} s of speech)`, amountMinor: prices.baseMinor }]
  const beyond = spokenSeconds - prices.includedSeconds
  const blocks = beyond > SLACK ? Math.ceil(beyond / 30 - SLACK) : 0
  if (blocks > 0) parts.push({ id: 'extra_time', label: `${blocks} × 30 s beyond ${prices.includedSeconds} s`, amountMinor: blocks * prices.perExtra30sMinor })
  if (format === 'four_minute') parts.push({ id: 'four_minute', label: '4-minute format', amountMinor: prices.fourMinuteSurchargeMinor })
  if (rush) parts.push({ id: 'rush', label: `Rush (ready ${settings.custom.rushLeadTimeDays} days after payment)`, amountMinor: prices.rushMinor })
  return { currency: settings.prices.currency, parts, totalMinor: parts.reduce((sum, part) => sum + part.amountMinor, 0) }
}

/**
 * The whole quote. `today` is the shop's date (YYYY-MM-DD). With voice `upload` the recording's
 * seconds stand for the speech; the lead-in and run-out are added as for a script.
 */
export function quoteCustomMessage(input: MessageQuoteInput, today: string, settings: EngineSettings = defaultEngineSettings): MessageQuote {
  const rpm = input.rpm ?? settings.standardRpm
  const script = input.script ?? ''
  const scriptFit = messageFitForFormat(script, input.format, settings, rpm)
  const { leadInSeconds, runOutSeconds, tightMargin, wordsPerMinute } = settings.speech
  const upload = input.voice === 'upload'
  const spokenSeconds = upload ? Math.max(0, input.voiceSeconds ?? 0) : scriptFit.spokenSeconds
  const seconds = upload ? leadInSeconds + spokenSeconds + runOutSeconds : scriptFit.seconds
  const capacity = scriptFit.capacitySeconds
  let verdict: MessageFitVerdict = 'fits'
  if (seconds > capacity + SLACK) verdict = 'too_long'
  else if (seconds > capacity * (1 - tightMargin) + SLACK) verdict = 'tight'
  // For a recording, the words the time left would still hold at the shop's speaking rate.
  const wordsLeft = upload ? Math.floor(((capacity - seconds) * wordsPerMinute) / 60 + SLACK) : scriptFit.wordsLeft

  const earliestDate = addDaysToDate(today, messageLeadTimeDays(input.rush, settings))
  const reasons: MessageQuote['reasons'] = []
  if (!upload && countSpokenWords(script) === 0) reasons.push({ field: 'script', message: 'write the script the maker will speak' })
  if (upload && input.voiceSeconds === undefined) reasons.push({ field: 'voiceSeconds', message: 'upload your recording first' })
  if (verdict === 'too_long') {
    const field = upload ? 'voiceSeconds' : 'script'
    const over = Math.ceil(seconds - capacity)
    reasons.push({
      field,
      message: upload
        ? `the recording is ${over} s too long for this format (${round1(capacity)} s with the lead-in and run-out); shorten it or choose the 4-minute format`
        : `the script is ${scriptFit.wordsOver} words too long for this format; shorten it or choose the 4-minute format`,
    })
  }
  if (input.wishedDate !== undefined) {
    if (input.wishedDate < today) reasons.push({ field: 'wishedDate', message: `${input.wishedDate} is in the past; the earliest date we can promise is ${earliestDate}` })
    else if (input.wishedDate < earliestDate) reasons.push({ field: 'wishedDate', message: `the earliest date we can promise is ${earliestDate}${input.rush ? '' : ' (or sooner with rush)'}` })
  }
  return {
    fit: { words: scriptFit.words, seconds: round1(seconds), capacitySeconds: round1(capacity), verdict, wordsLeft },
    spokenSeconds,
    price: messagePriceParts(input.format, spokenSeconds, input.rush, settings),
    earliestDate,
    canOrder: reasons.length === 0,
    reasons,
  }
}

/** The date a paid message is due: the wished-for date, or the lead time from payment if that is later. */
export function messageDueDate(wishedDate: string, paidDate: string, rush: boolean, settings: EngineSettings = defaultEngineSettings): string {
  const leadDate = addDaysToDate(paidDate, messageLeadTimeDays(rush, settings))
  return wishedDate > leadDate ? wishedDate : leadDate
}

/**
 * Timing marks for the maker's cue sheet: every 15 s of speech (after the lead-in) at the shop's
 * speaking rate, the index of the word being spoken at that second. Words are the script's own
 * tokens; each token is given the spoken words it counts for ("1905" = three).
 */
export function messageCueMarks(script: string, settings: EngineSettings = defaultEngineSettings, stepSeconds = 15) {
  const words = script.normalize('NFKC').split(/\s+/u).filter(token => token !== '')
  const secondsPerWord = 60 / settings.speech.wordsPerMinute
  const marks: { second: number, wordIndex: number }[] = []
  let elapsed = 0
  let next = stepSeconds
  for (const [index, token] of words.entries()) {
    const spoken = countSpokenWords(token)
    const end = elapsed + spoken * secondsPerWord
    // A mark falls on the word being said when that many seconds of speech have passed (on a word's
    // very start, that word).
    while (spoken > 0 && next < end - SLACK) {
      marks.push({ second: next, wordIndex: index })
      next += stepSeconds
    }
    elapsed = end
  }
  return { words, marks, spokenSeconds: elapsed }
}
