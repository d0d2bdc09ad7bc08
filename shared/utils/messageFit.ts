import { cylinderFormats, cylinderFormatTable, playingTimeMinutes } from './cylinder'
import type { CylinderFormat } from './cylinder'
import { defaultEngineSettings } from './engineSettings'
import type { EngineSettings } from './engineSettings'

/*
 * Counting words the way a reader speaks them, so the meter measures time, not characters:
 * - numbers count the words said aloud: "1,250" = one thousand two hundred fifty = 5, "3.5" = three point
 *   five = 3, "42" = forty-two = 2 (a hyphenated word counts each part, as "well-known" = 2);
 *   years 1100–1999 and 2010–2099 as a year is said ("1905" = nineteen oh five = 3);
 *   digit strings with a leading zero or more than twelve digits are read digit by digit;
 * - "50%" adds "percent", "$5" adds "dollars" ("$3.50" = three dollars fifty = 3), "1st" counts as the number;
 * - "&" is "and"; punctuation, emoji and symbols alone are silent;
 * - a web address or e-mail is read as its parts with "dot", "at", "slash" between them, without "https://".
 */

const DASHES = /[-‐‑‒–—―/:]/u
const LETTER_OR_DIGIT = /[\p{L}\p{N}]/u
const URL_OR_EMAIL = /^(?:https?:\/\/|www\.)\S+$|^[^\s@]+@[^\s@]+\.[^\s@]+$/iu
const NUMBER_TOKEN = /^([$€£¥]?)(\d{1,3}(?:,\d{3})+|\d+)?(?:\.(\d+))?(%|st|nd|rd|th|s|'s)?$/iu

const ONES_AND_TEENS_ARE_ONE_WORD = 20

/** Spoken words in a whole number below 1000: "two hundred forty-five" = 4 (hyphen parts count). */
function wordsBelowThousand(value: number): number {
  const hundreds = Math.floor(value / 100)
  const rest = value % 100
  let words = hundreds > 0 ? 2 : 0
  if (rest > 0) words += rest < ONES_AND_TEENS_ARE_ONE_WORD || rest % 10 === 0 ? 1 : 2
  return words
}

/** Spoken words in a whole number said the long way: 1250 → "one thousand two hundred fifty" = 5. */
export function spokenIntegerWordCount(value: number): number {
  if (!Number.isSafeInteger(value) || value < 0) throw new RangeError(`expected a whole number, got ${value}`)
  if (value === 0) return 1
  let words = 0
  let rest = value
  let scale = 0
  while (rest > 0) {
    const group = rest % 1000
    if (group > 0) words += wordsBelowThousand(group) + (scale > 0 ? 1 : 0)
    rest = Math.floor(rest / 1000)
    scale += 1
  }
  return words
}

function isSpokenAsYear(digits: string): boolean {
  if (!/^\d{4}$/.test(digits)) return false
  const value = Number(digits)
  return (value >= 1100 && value <= 1999) || (value >= 2010 && value <= 2099)
}

function yearWordCount(digits: string): number {
  const century = Number(digits.slice(0, 2))
  const rest = Number(digits.slice(2))
  if (rest === 0) return spokenIntegerWordCount(century) + 1 // nineteen hundred
  if (rest < 10) return spokenIntegerWordCount(century) + 2 // nineteen oh five
  return spokenIntegerWordCount(century) + spokenIntegerWordCount(rest)
}

function digitStringWordCount(digits: string, grouped = false): number {
  if (digits.length > 1 && digits.startsWith('0')) return digits.length
  if (digits.length > 12) return digits.length
  // "1,250" is an amount; "1250" standing alone is read as a year.
  if (!grouped && isSpokenAsYear(digits)) return yearWordCount(digits)
  return spokenIntegerWordCount(Number(digits))
}

function numberTokenWordCount(token: string): number | undefined {
  const match = NUMBER_TOKEN.exec(token)
  if (!match) return undefined
  const [, currency = '', whole = '', fraction, suffix = ''] = match
  if (whole === '' && fraction === undefined) return undefined
  let words = whole === '' ? 0 : digitStringWordCount(whole.replaceAll(',', ''), whole.includes(','))
  if (fraction !== undefined) {
    // "$3.50" is said "three dollars fifty"; "3.50" otherwise "three point five zero".
    words += currency !== '' && fraction.length === 2
      ? (Number(fraction) === 0 ? 0 : spokenIntegerWordCount(Number(fraction)))
      : 1 + fraction.length
  }
  if (currency !== '') words += 1
  if (suffix === '%') words += 1
  return words
}

/** Letters and digits mixed ("mp3", "GW24"): each run of letters is a word, each run of digits a number. */
function mixedTokenWordCount(token: string): number {
  let words = 0
  for (const run of token.match(/\p{L}+(?:['’]\p{L}+)*|\d+/gu) ?? []) {
    words += /^\d+$/.test(run) ? digitStringWordCount(run) : 1
  }
  return words
}

function addressWordCount(token: string): number {
  const address = token.replace(/^https?:\/\//i, '').replace(/[/.,;:!?)]+$/, '')
  const parts = address.match(/[\p{L}\p{N}]+/gu) ?? []
  const separators = address.match(/[.@/]/g) ?? []
  return parts.length + Math.min(separators.length, Math.max(parts.length - 1, 0))
}

function stripSilentEdges(part: string): string {
  // Keep a leading currency sign and a trailing percent sign; everything else at the edges is punctuation.
  return part
    .replace(/^[^\p{L}\p{N}$€£¥.]+/u, '')
    .replace(/[^\p{L}\p{N}%]+$/u, '')
}

function partWordCount(rawPart: string): number {
  const part = stripSilentEdges(rawPart)
  if (!LETTER_OR_DIGIT.test(part)) return rawPart.includes('&') ? 1 : 0
  if (/^[\p{L}'’.]+$/u.test(part)) return 1
  return numberTokenWordCount(part) ?? mixedTokenWordCount(part)
}

/** Words a reader says aloud for this script (see the rules at the top of this file). */
export function countSpokenWords(script: string): number {
  let words = 0
  for (const token of script.normalize('NFKC').split(/\s+/u)) {
    if (token === '') continue
    const bare = token.replace(/^[("'“‘<]+|[)"'”’>.,;:!?]+$/gu, '')
    if (URL_OR_EMAIL.test(bare)) {
      words += addressWordCount(bare)
      continue
    }
    for (const part of token.split(DASHES)) words += partWordCount(part)
  }
  return words
}

export type MessageFitVerdict = 'fits' | 'tight' | 'too_long'

export interface MessageFit {
  format: CylinderFormat
  rpm: number
  words: number
  /** Time the words take at the speaking rate. */
  spokenSeconds: number
  /** What the message takes on the record: lead-in + spoken + run-out. */
  seconds: number
  /** Playing time of the format's recordable length at this speed. */
  capacitySeconds: number
  verdict: MessageFitVerdict
  /** Most words the format takes with the lead-in and run-out. */
  maxWords: number
  /** Words still free; negative when the script is over. */
  wordsLeft: number
  /** Words to cut; 0 when it fits. */
  wordsOver: number
}

const COMPARISON_SLACK_SECONDS = 1e-9

/**
 * How a script sits on a format: fits while it needs at most (1 − tightMargin) of the capacity,
 * tight while it needs more than that but no more than the capacity, too_long beyond.
 */
export function messageFitForFormat(
  script: string,
  format: CylinderFormat,
  settings: EngineSettings = defaultEngineSettings,
  rpm: number = settings.standardRpm,
): MessageFit {
  const { wordsPerMinute, leadInSeconds, runOutSeconds, tightMargin } = settings.speech
  const words = countSpokenWords(script)
  const spokenSeconds = (words / wordsPerMinute) * 60
  const seconds = leadInSeconds + spokenSeconds + runOutSeconds
  const capacitySeconds = 60 * playingTimeMinutes(
    settings.formats[format].recordableLengthIn,
    cylinderFormatTable[format].groovesPerInch,
    rpm,
  )
  let verdict: MessageFitVerdict = 'fits'
  if (seconds > capacitySeconds + COMPARISON_SLACK_SECONDS) verdict = 'too_long'
  else if (seconds > capacitySeconds * (1 - tightMargin) + COMPARISON_SLACK_SECONDS) verdict = 'tight'
  const secondsForWords = capacitySeconds - leadInSeconds - runOutSeconds
  const maxWords = Math.max(0, Math.floor((secondsForWords * wordsPerMinute) / 60 + COMPARISON_SLACK_SECONDS))
  const wordsLeft = maxWords - words
  return {
    format,
    rpm,
    words,
    spokenSeconds,
    seconds,
    capacitySeconds,
    verdict,
    maxWords,
    wordsLeft,
    wordsOver: Math.max(0, -wordsLeft),
  }
}

/** The same script against every format, in the order of `cylinderFormats`. */
export function messageFitAllFormats(
  script: string,
  settings: EngineSettings = defaultEngineSettings,
  rpm: number = settings.standardRpm,
): MessageFit[] {
  return cylinderFormats.map(format => messageFitForFormat(script, format, settings, rpm))
}
