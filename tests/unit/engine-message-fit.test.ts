import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'
import { countSpokenWords, messageFitAllFormats, messageFitForFormat, spokenIntegerWordCount } from '../../shared/utils/messageFit'

// An independent speller for the check: the words of a number, hyphens as written in English.
const ONES = ['zero', 'one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten', 'eleven', 'twelve',
  'thirteen', 'fourteen', 'fifteen', 'sixteen', 'seventeen', 'eighteen', 'nineteen']
const TENS = ['', '', 'twenty', 'thirty', 'forty', 'fifty', 'sixty', 'seventy', 'eighty', 'ninety']
const SCALES = ['', 'thousand', 'million', 'billion']
function spellBelowThousand(n: number): string {
  const parts: string[] = []
  if (n >= 100) parts.push(`${ONES[Math.floor(n / 100)]} hundred`)
  const rest = n % 100
  if (rest > 0 && rest < 20) parts.push(ONES[rest] ?? '')
  else if (rest >= 20) parts.push(rest % 10 === 0 ? TENS[rest / 10] ?? '' : `${TENS[Math.floor(rest / 10)]}-${ONES[rest % 10]}`)
  return parts.join(' ')
}
function spell(n: number): string {
  if (n === 0) return 'zero'
  const groups: string[] = []
  for (let scale = 0; n > 0; scale++, n = Math.floor(n / 1000)) {
    if (n % 1000 > 0) groups.unshift(`${spellBelowThousand(n % 1000)}${scale > 0 ? ` ${SCALES[scale]}` : ''}`)
  }
  return groups.join(' ')
}
const wordsIn = (text: string) => text.split(/[\s-]+/).length

const words = (count: number) => Array.from({ length: count }, () => 'word').join(' ')

describe('countSpokenWords', () => {
  it.each([
    ['forty-two', 2],
    ['well-known', 2],
    ['Hello, world! 🎉 …', 2],
    ['don\'t stop — ever', 3],
    ['rock & roll', 3],
  ])('counts %j as %d words (hyphen parts count; punctuation and emoji are silent)', (script, count) => {
    expect(countSpokenWords(script)).toBe(count)
  })

  it.each([
    ['1,250', wordsIn('one thousand two hundred fifty')],
    ['3.5', wordsIn('three point five')],
    ['42', wordsIn('forty-two')],
    ['Happy 42nd birthday', wordsIn('happy forty-second birthday')],
    ['$3.50', wordsIn('three dollars fifty')],
    ['50%', wordsIn('fifty percent')],
    ['in 1905', wordsIn('in nineteen oh five')],
    ['at 10:30', wordsIn('at ten thirty')],
    ['call 007', wordsIn('call zero zero seven')],
  ])('counts %j as it is said aloud', (script, count) => {
    expect(countSpokenWords(script)).toBe(count)
  })

  it.each([
    ['write to maker@example.com', wordsIn('write to maker at example dot com')],
    ['see https://example.org/care.', wordsIn('see example dot org slash care')],
  ])('reads addresses as their parts: %j', (script, count) => {
    expect(countSpokenWords(script)).toBe(count)
  })

  it('counts whole numbers as their spelled-out words (property, against an independent speller)', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: 999_999_999_999 }), (n) => {
      expect(spokenIntegerWordCount(n)).toBe(wordsIn(spell(n)))
    }), { numRuns: 2_000 })
  })

  it('counts nothing in an empty script', () => {
    expect(countSpokenWords('  \n ')).toBe(0)
  })
})

describe('messageFitForFormat (speaking rate about 150 words a minute: from memory)', () => {
  it('turns words into seconds at the speaking rate, plus lead-in and run-out', () => {
    const { wordsPerMinute, leadInSeconds, runOutSeconds } = defaultEngineSettings.speech
    expect(wordsPerMinute).toBe(150)
    const fit = messageFitForFormat(words(150), 'two_minute')
    expect(fit.spokenSeconds).toBeCloseTo(60, 10)
    expect(fit.seconds).toBeCloseTo(60 + leadInSeconds + runOutSeconds, 10)
  })

  it('capacity is the playing time of the format\'s recordable length (cylinder technical notes of university sound archives; arithmetic)', () => {
    const [two, four] = messageFitAllFormats('')
    expect(two?.format).toBe('two_minute')
    expect(two?.capacitySeconds).toBeCloseTo(2.25 * 60, 9)
    expect(four?.capacitySeconds).toBeCloseTo(4.75 * 60, 9)
    // at 120 rpm the same groove lasts a third longer
    expect(messageFitForFormat('', 'two_minute', defaultEngineSettings, 120).capacitySeconds).toBeCloseTo(3.6 * 100 / 120 * 60, 9)
  })

  it('is tight within the last 10 % of the capacity and too long beyond it', () => {
    // one word a second and no lead-in or run-out, so seconds = words
    const settings = engineSettingsSchema.parse({ speech: { wordsPerMinute: 60, leadInSeconds: 0, runOutSeconds: 0, tightMargin: 0.1 } })
    const capacity = (3.6 * 100 / 160) * 60
    const tightFrom = capacity * 0.9
    const verdict = (count: number) => messageFitForFormat(words(count), 'two_minute', settings).verdict
    expect(verdict(Math.floor(tightFrom))).toBe('fits')
    expect(verdict(Math.floor(tightFrom) + 1)).toBe('tight')
    expect(verdict(Math.floor(capacity))).toBe('tight')
    expect(verdict(Math.floor(capacity) + 1)).toBe('too_long')
  })

  it('puts the boundary exactly at 90 % and 100 %', () => {
    // one word a second; a recordable length that plays 100 s at 160 rpm: 100/60 min × 160 rpm ÷ 100 grooves per inch
    const settings = engineSettingsSchema.parse({
      speech: { wordsPerMinute: 60, leadInSeconds: 0, runOutSeconds: 0, tightMargin: 0.1 },
      formats: { two_minute: { recordableLengthIn: (100 / 60) * 160 / 100 } },
    })
    expect(messageFitForFormat(words(90), 'two_minute', settings).verdict).toBe('fits')
    expect(messageFitForFormat(words(91), 'two_minute', settings).verdict).toBe('tight')
    expect(messageFitForFormat(words(100), 'two_minute', settings).verdict).toBe('tight')
    expect(messageFitForFormat(words(101), 'two_minute', settings).verdict).toBe('too_long')
  })

  it('gives words left, and words over as negative words left', () => {
    const { wordsPerMinute, leadInSeconds, runOutSeconds } = defaultEngineSettings.speech
    const maxWords = Math.floor(((2.25 * 60 - leadInSeconds - runOutSeconds) * wordsPerMinute) / 60)
    const short = messageFitForFormat(words(100), 'two_minute')
    expect(short.maxWords).toBe(maxWords)
    expect(short.wordsLeft).toBe(maxWords - 100)
    expect(short.wordsOver).toBe(0)
    const long = messageFitForFormat(words(maxWords + 7), 'two_minute')
    expect(long.verdict).toBe('too_long')
    expect(long.wordsLeft).toBe(-7)
    expect(long.wordsOver).toBe(7)
  })
})
