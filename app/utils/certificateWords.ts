import { cylinderFormatTable } from '#shared/utils/cylinder'
import { formatLength, type UnitPreferences } from '#shared/utils/units'
import { countOf, formatDay } from '#shared/utils/wording'
import type { Certificate } from '~/composables/useCertificate'
import type { FactItem } from '~/utils/factList'

/** A certificate's date in words in the shop's locale ("3 December 2026"); a bare day never slips a day. */
export const certificateDay = (iso: string | null | undefined, locale?: string) => iso ? formatDay(iso, locale, 'long') : '—'

/** A level in dBFS with a true minus sign. */
export const formatDbfs = (value: number) => `${value.toFixed(1).replace('-', '−')} dBFS`

export const certificateVerdictWords = { pass: 'pass', marginal: 'marginal', fail: 'fail', incomplete: 'incomplete (the take did not cover the surface)' } as const

const present = (facts: (FactItem | false | null | undefined)[]) => facts.filter((fact): fact is FactItem => !!fact)

/** The blank a cylinder was cut on: code, format, wax batch, diameter, surface, and the maker's reason where it was not the usual one. */
export function certificateBlankFacts(certificate: Certificate, prefs: UnitPreferences): FactItem[] {
  const { blank, batch } = certificate
  return present([
    { term: 'Blank code', value: blank.code, valueClass: 'font-mono' },
    { term: 'Format', value: cylinderFormatTable[certificate.format].label },
    { term: 'Wax batch', value: `${batch.code}, poured ${certificateDay(batch.pourDate, prefs.locale)} — ${batch.waxFormula ? `${batch.waxFormula} wax: ` : ''}${batch.formula}` },
    { term: 'Outside diameter', value: blank.diameterIn ? formatLength(blank.diameterIn, prefs, { decimal: true }) : 'not recorded' },
    { term: 'Surface', value: blank.surface === 1 ? 'the first surface shaved on this blank' : `surface ${blank.surface} (reshaved ${countOf(blank.surface - 1, 'time', 'times', prefs.locale)})` },
    !!certificate.blankOverrideReason && { term: 'Blank chosen by the maker', value: `Not the wax or format the item is usually made of: ${certificate.blankOverrideReason}` },
  ])
}

/** The cut: recorder, horn, stylus, day, the test of the cut and when it was ready. */
export function certificateCutFacts(certificate: Certificate, prefs: UnitPreferences): FactItem[] {
  const { recorder, testCut } = certificate
  return present([
    { term: 'Recorder', value: recorder?.name ?? '—' },
    !!recorder?.horn && { term: 'Horn', value: recorder.horn },
    !!recorder?.stylus && { term: 'Cutting stylus', value: recorder.stylus },
    { term: 'Cut on', value: certificateDay(certificate.cutAt, prefs.locale) },
    !!testCut && { term: 'Test of the cut', value: `${formatDbfs(testCut.aWeightedDbfs)} A-weighted, ${testCut.clicksPerMinute.toFixed(1)} clicks a minute (${certificateVerdictWords[testCut.verdict]})` },
    { term: 'Ready for dispatch', value: certificate.readyAt ? certificateDay(certificate.readyAt, prefs.locale) : 'not yet' },
  ])
}

/** The surface test's figures beside the shop's fail limits, one row a measure; none without a test. */
export function certificateSurfaceRows(certificate: Certificate): { label: string, measured: string, limit: string }[] {
  const test = certificate.surfaceTest
  if (!test) return []
  const limits = certificate.thresholds
  return [
    { label: 'Surface noise, A-weighted', measured: formatDbfs(test.aWeightedDbfs), limit: formatDbfs(limits.aWeightedDbfs.fail) },
    { label: 'Once-per-turn noise', measured: `${test.rotaryDb.toFixed(1)} dB`, limit: `${limits.rotaryDb.fail.toFixed(1)} dB` },
    { label: 'Clicks per minute', measured: test.clicksPerMinute.toFixed(1), limit: limits.clicksPerMinute.fail.toFixed(1) },
  ]
}
