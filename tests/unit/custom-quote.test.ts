import { describe, expect, it } from 'vitest'
import { customMessageOrderSchema, customQuoteBodySchema } from '../../shared/utils/customSchemas'
import { defaultEngineSettings, engineSettingsSchema } from '../../shared/utils/engineSettings'
import { customMessagePriceComponents } from '../../shared/utils/money'
import { addDaysToDate, messageCueMarks, messageDueDate, quoteCustomMessage } from '../../shared/utils/messageQuote'

/*
 * Hand-worked quotes with the shop's default figures:
 * - speaking rate 150 words a minute (from memory), so one word = 0.4 s; lead-in 4 s and run-out 4 s;
 *   "tight" within the last 10 % of the capacity (shop choices);
 * - capacity of a 2-minute record: 3.6 in × 100 grooves per inch ÷ 160 rpm = 2.25 min = 135 s; of a
 *   4-minute record: 3.8 in × 200 ÷ 160 = 4.75 min = 285 s (cylinder technical notes of university sound
 *   archives; arithmetic); tight above 0.9 × 135 = 121.5 s;
 * - price (the shop's default prices, arithmetic): base $65.00 covers 60 s of speech; each started 30 s
 *   beyond adds $8.00; 4-minute format +$15.00; rush +$25.00;
 * - lead time 10 days, rush 4 days (shop choices).
 */
const TODAY = '2026-12-03'
const words = (count: number) => Array.from({ length: count }, () => 'word').join(' ')
const quote = (input: Partial<Parameters<typeof quoteCustomMessage>[0]>) =>
  quoteCustomMessage({ format: 'two_minute', voice: 'maker', rush: false, ...input }, TODAY, defaultEngineSettings)

describe('quoteCustomMessage: fit and price, worked by hand', () => {
  it('100 words on a 2-minute record: 40 s spoken + 8 s = 48 s of 135 → fits, 317 − 100 = 217 words left; base price only', () => {
    const answer = quote({ script: words(100) })
    expect(answer.fit).toEqual({ words: 100, seconds: 48, capacitySeconds: 135, verdict: 'fits', wordsLeft: 217 })
    expect(answer.price).toEqual({ currency: 'USD', parts: [{ id: 'base', label: 'Personal message (up to 60 s of speech)', amountMinor: 6500 }], totalMinor: 6500 })
    expect(answer.canOrder).toBe(true)
    expect(answer.reasons).toEqual([])
  })

  it('300 words: 120 s + 8 s = 128 s, above 121.5 → tight; 60 s beyond the included 60 = 2 × $8 → $81.00', () => {
    const answer = quote({ script: words(300) })
    expect(answer.fit).toEqual({ words: 300, seconds: 128, capacitySeconds: 135, verdict: 'tight', wordsLeft: 17 })
    expect(answer.price.parts.map(part => [part.id, part.amountMinor])).toEqual([['base', 6500], ['extra_time', 1600]])
    expect(answer.price.totalMinor).toBe(8100)
    expect(answer.canOrder).toBe(true)
  })

  it('320 words: 128 s + 8 s = 136 s > 135 → too long by 3 words; cannot be ordered, the reason names the script', () => {
    const answer = quote({ script: words(320) })
    expect(answer.fit).toEqual({ words: 320, seconds: 136, capacitySeconds: 135, verdict: 'too_long', wordsLeft: -3 })
    // 68 s beyond 60 → 3 started blocks of 30 s.
    expect(answer.price.totalMinor).toBe(6500 + 3 * 800)
    expect(answer.canOrder).toBe(false)
    expect(answer.reasons).toEqual([{ field: 'script', message: expect.stringContaining('3 words too long') }])
  })

  it('151 words on a 4-minute record, rush: 60.4 s → one started block; $65 + $8 + $15 + $25 = $113.00', () => {
    const answer = quote({ script: words(151), format: 'four_minute', rush: true })
    expect(answer.fit.capacitySeconds).toBe(285)
    expect(answer.price.parts.map(part => [part.id, part.amountMinor])).toEqual([['base', 6500], ['extra_time', 800], ['four_minute', 1500], ['rush', 2500]])
    expect(answer.price.totalMinor).toBe(11_300)
    // The same total as the cart engine's own components.
    expect(customMessagePriceComponents('four_minute', 60.4, true).reduce((sum, part) => sum + part.amountMinor, 0)).toBe(11_300)
    expect(answer.earliestDate).toBe('2026-12-07')
  })

  it('exactly 150 words is 60.0 s of speech: no extra block', () => {
    expect(quote({ script: words(150) }).price.totalMinor).toBe(6500)
  })

  it('a recording of 95 s replaces the script: 95 + 8 = 103 s → fits; 35 s beyond → 2 blocks; (135 − 103) s holds 80 more words', () => {
    const answer = quote({ voice: 'upload', voiceSeconds: 95 })
    expect(answer.fit).toEqual({ words: 0, seconds: 103, capacitySeconds: 135, verdict: 'fits', wordsLeft: 80 })
    expect(answer.price.totalMinor).toBe(8100)
    expect(answer.canOrder).toBe(true)
  })

  it('a recording of 130 s is too long for a 2-minute record (138 s > 135): the reason names voiceSeconds', () => {
    const answer = quote({ voice: 'upload', voiceSeconds: 130 })
    expect(answer.fit.verdict).toBe('too_long')
    expect(answer.reasons.map(reason => reason.field)).toEqual(['voiceSeconds'])
  })

  it('the shop\'s own figures are used: at 120 words a minute 100 words take 50 s', () => {
    const slow = engineSettingsSchema.parse({ speech: { wordsPerMinute: 120 } })
    expect(quoteCustomMessage({ script: words(100), format: 'two_minute', voice: 'maker', rush: false }, TODAY, slow).fit.seconds).toBe(58)
  })
})

describe('quoteCustomMessage: dates and refusals', () => {
  it('earliest date = today + 10 days (rush: + 4)', () => {
    expect(quote({ script: 'Hello' }).earliestDate).toBe('2026-12-13')
    expect(quote({ script: 'Hello', rush: true }).earliestDate).toBe('2026-12-07')
  })

  it('a wished-for date before the earliest names the earliest; one in the past says so; the earliest itself is fine', () => {
    expect(quote({ script: 'Hello', wishedDate: '2026-12-10' }).reasons).toEqual([{ field: 'wishedDate', message: 'the earliest date we can promise is 2026-12-13 (or sooner with rush)' }])
    expect(quote({ script: 'Hello', wishedDate: '2026-12-01' }).reasons[0]).toEqual({ field: 'wishedDate', message: '2026-12-01 is in the past; the earliest date we can promise is 2026-12-13' })
    expect(quote({ script: 'Hello', wishedDate: '2026-12-13' }).canOrder).toBe(true)
    expect(quote({ script: 'Hello', wishedDate: '2026-12-10', rush: true }).canOrder).toBe(true)
  })

  it('an empty script for the maker to speak, and an upload without its recording, cannot be ordered', () => {
    expect(quote({ script: '  … ' }).reasons).toEqual([{ field: 'script', message: 'write the script the maker will speak' }])
    expect(quote({ voice: 'upload' }).reasons.map(reason => reason.field)).toEqual(['voiceSeconds'])
  })

  it('due date: the wished-for date, or the lead time from payment when that is later', () => {
    expect(messageDueDate('2026-12-20', '2026-12-03', false)).toBe('2026-12-20')
    expect(messageDueDate('2026-12-05', '2026-12-03', true)).toBe('2026-12-07')
    expect(addDaysToDate('2026-12-28', 10)).toBe('2027-01-07')
  })
})

describe('schemas', () => {
  it('a 20,000-word script is over the 20,000-character cap; a bad format and a non-date are named', () => {
    const result = customQuoteBodySchema.safeParse({ script: words(20_000), format: 'two_minute', voice: 'maker', rush: false })
    expect(result.success).toBe(false)
    expect(result.error!.issues[0]!.path).toEqual(['script'])
    const bad = customQuoteBodySchema.safeParse({ script: 'Hi', format: 'eight_minute', voice: 'maker', rush: false, wishedDate: '2026-02-30' })
    expect(bad.error!.issues.map(issue => issue.path.join('.')).sort()).toEqual(['format', 'wishedDate'])
  })

  it('a message for the checkout needs an occasion and a recipient of 1–80 characters and notes of at most 1000', () => {
    const base = { occasion: 'Birthday', recipientName: 'Ada', script: 'Hi', voice: 'maker', format: 'two_minute', rush: false, wishedDate: '2026-12-20' }
    expect(customMessageOrderSchema.safeParse(base).success).toBe(true)
    const bad = customMessageOrderSchema.safeParse({ ...base, occasion: '', recipientName: 'x'.repeat(81), notes: 'n'.repeat(1001) })
    expect(bad.error!.issues.map(issue => issue.path.join('.')).sort()).toEqual(['notes', 'occasion', 'recipientName'])
  })
})

describe('messageCueMarks', () => {
  it('marks every 15 s of speech at 0.4 s a word: 15 s falls in word 38 (index 37, 14.8–15.2 s); 30 s starts word 76 (index 75)', () => {
    const cue = messageCueMarks(words(100))
    expect(cue.words).toHaveLength(100)
    expect(cue.marks).toEqual([{ second: 15, wordIndex: 37 }, { second: 30, wordIndex: 75 }])
    expect(cue.spokenSeconds).toBeCloseTo(40, 9)
  })

  it('a token said as several words takes their time: "1905" is three words (1.2 s)', () => {
    // 36 words (14.4 s), then "1905" from 14.4 s to 15.6 s: the 15 s mark is on it.
    const cue = messageCueMarks(`${words(36)} 1905 ${words(10)}`)
    expect(cue.marks).toEqual([{ second: 15, wordIndex: 36 }])
  })
})
