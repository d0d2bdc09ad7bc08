import { and, desc, eq, gte } from 'drizzle-orm'
import { z } from 'zod'
import { analyseSurfaceWav, AudioInputError, type SurfaceAnalysis, type SurfaceThresholds } from '../../audio'
import { blanks, recorders, testCuts } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction

const text = (field: string, max: number, min = 0) => z.string({ error: `${field} must be text` }).trim()
  .min(min, `${field} is required`).max(max, `${field} is at most ${max} characters`)

const recorderFields = {
  name: text('name', 80, 1),
  stylus: text('stylus', 200),
  horn: text('horn', 200),
  spacer: text('spacer', 200),
  conditionNotes: text('conditionNotes', 2000),
  inService: z.boolean({ error: 'inService must be true or false' }),
}

/** A recorder as the maker describes it; every field but the name may stay empty. */
export const recorderFieldsSchema = z.object({
  ...recorderFields,
  stylus: recorderFields.stylus.default(''),
  horn: recorderFields.horn.default(''),
  spacer: recorderFields.spacer.default(''),
  conditionNotes: recorderFields.conditionNotes.default(''),
  inService: recorderFields.inService.default(true),
})
/** A change: only the fields sent are changed (no defaults here, or a PATCH would blank the rest). */
export const recorderPatchSchema = z.object(recorderFields).partial()

/**
 * The ranking rule, in one place: each recorder's last 10 test cuts from the last 90 days; the
 * median A-weighted level of those cuts, rounded to 0.5 dB (a smaller difference is not heard on
 * wax), quietest first; ties go to the fewer median clicks per minute, then to more cuts, then by
 * name. A recorder without a cut in the window is listed unranked. Tickets suggest the best-ranked
 * recorder in service.
 */
export const recorderRanking = { windowDays: 90, lastCuts: 10, levelStepDb: 0.5 } as const
export const recorderRankingRule = `Median A-weighted level of each recorder's last ${recorderRanking.lastCuts} test cuts from the last ${recorderRanking.windowDays} days, rounded to ${recorderRanking.levelStepDb} dB, quietest first; ties go to fewer clicks per minute (median), then to more cuts. Recorders without a cut in that time are not ranked.`

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b)
  const middle = Math.floor(sorted.length / 2)
  return sorted.length % 2 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2
}

export interface RankedRecorder {
  id: number
  name: string
  stylus: string
  horn: string
  inService: boolean
  /** Good; its latest test cut (within the ranking window) failed; or out of service. */
  standing: RecorderStanding
  rank: number | null
  cutsConsidered: number
  medianAWeightedDbfs: number | null
  medianClicksPerMinute: number | null
  lastCutAt: Date | null
}

export type RecorderStanding = 'good' | 'last_cuts_failed' | 'out_of_service'

/** Out of service first; else a failed latest test cut puts a recorder in trouble until a good cut follows. */
export function recorderStanding(inService: boolean, latestCutVerdicts: string[]): RecorderStanding {
  if (!inService) return 'out_of_service'
  return latestCutVerdicts[0] === 'fail' ? 'last_cuts_failed' : 'good'
}

export async function rankRecorders(db: Db, now = new Date()): Promise<RankedRecorder[]> {
  const since = new Date(now.getTime() - recorderRanking.windowDays * 86_400_000)
  const all = await db.select().from(recorders).orderBy(recorders.name)
  const cuts = await db.select({ recorderId: testCuts.recorderId, aWeightedDbfs: testCuts.aWeightedDbfs, clicksPerMinute: testCuts.clicksPerMinute, cutAt: testCuts.cutAt, verdict: testCuts.verdict })
    .from(testCuts).where(gte(testCuts.cutAt, since)).orderBy(desc(testCuts.cutAt), desc(testCuts.id))
  const recent = new Map<number, typeof cuts>()
  for (const cut of cuts) {
    const list = recent.get(cut.recorderId) ?? []
    if (list.length < recorderRanking.lastCuts) list.push(cut)
    recent.set(cut.recorderId, list)
  }
  const rows = all.map((recorder): RankedRecorder => {
    const list = recent.get(recorder.id) ?? []
    return {
      id: recorder.id,
      name: recorder.name,
      stylus: recorder.stylus,
      horn: recorder.horn,
      inService: recorder.inService,
      standing: recorderStanding(recorder.inService, list.map(cut => cut.verdict)),
      rank: null,
      cutsConsidered: list.length,
      medianAWeightedDbfs: list.length ? median(list.map(cut => cut.aWeightedDbfs)) : null,
      medianClicksPerMinute: list.length ? median(list.map(cut => cut.clicksPerMinute)) : null,
      lastCutAt: list[0]?.cutAt ?? null,
    }
  })
  const step = (level: number) => Math.round(level / recorderRanking.levelStepDb)
  const ranked = rows.filter(row => row.medianAWeightedDbfs !== null).sort((a, b) =>
    step(a.medianAWeightedDbfs!) - step(b.medianAWeightedDbfs!)
    || a.medianClicksPerMinute! - b.medianClicksPerMinute!
    || b.cutsConsidered - a.cutsConsidered
    || a.name.localeCompare(b.name))
  ranked.forEach((row, index) => {
    row.rank = index + 1
  })
  return [...ranked, ...rows.filter(row => row.medianAWeightedDbfs === null)]
}

/** The recorder a ticket should be cut with: the best-ranked in good standing, else any in good standing. */
export function suggestedRecorder(ranking: RankedRecorder[]): { id: number, name: string, reason: string } | null {
  const best = ranking.find(row => row.standing === 'good' && row.rank !== null)
  if (best) return { id: best.id, name: best.name, reason: `ranked ${best.rank} by its recent test cuts, median ${best.medianAWeightedDbfs!.toFixed(1).replace('-', '−')} dBFS A-weighted` }
  const any = ranking.find(row => row.standing === 'good')
  return any ? { id: any.id, name: any.name, reason: 'in service; no recent test cuts to rank it by' } : null
}

/** The limits a test cut is judged by: the shop's surface-test limits. */
export async function testCutThresholds(db?: Db) {
  return await getSetting('surface', db)
}

export const testCutFieldsSchema = z.object({
  recorderId: idField('recorderId', 'choose a recorder'),
  blankCode: z.string().trim().toUpperCase().max(40, 'blankCode is too long').optional().transform(code => code || undefined),
  notes: text('notes', 2000).default(''),
  rpm: z.coerce.number({ error: 'rpm must be a number' }).refine(rpm => [120, 144, 160].includes(rpm), 'rpm must be 120, 144 or 160').default(160),
  cutAt: z.iso.datetime({ offset: true, error: 'cutAt must be a date and time' }).optional(),
})

/** Analyses a test-cut WAV like a surface test; a file we cannot read is a 4xx naming the file. */
export async function analyseTestCut(bytes: Uint8Array, rpm: number, thresholds: SurfaceThresholds): Promise<SurfaceAnalysis> {
  const { taken } = await sniffFile(bytes)
  if (taken?.mime !== 'audio/wav') {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: 'file: a test cut is analysed from a WAV recording; this file is not one.', data: { fields: { file: 'only WAV recordings' } } })
  }
  try {
    return analyseSurfaceWav(bytes, { rpm, thresholds })
  }
  catch (error) {
    if (error instanceof AudioInputError) {
      throw createError({ statusCode: error.statusCode, statusMessage: 'Unreadable recording', message: `file: ${error.message}`, data: { fields: { file: error.message } } })
    }
    throw error
  }
}

/** Stores the recording and the analysis as a test cut of `recorderId` (and of a blank, when named). */
export async function storeTestCut(tx: Db, input: { bytes: Uint8Array, name: string, analysis: SurfaceAnalysis, recorderId: number, blankId: number | null, notes: string, cutAt?: Date, userId: number | null }) {
  const stored = await storeFile(tx, { data: input.bytes, mime: 'audio/wav', purpose: 'test_cut', originalName: input.name, isPublic: false, uploadedBy: input.userId })
  const [cut] = await tx.insert(testCuts).values({
    recorderId: input.recorderId,
    blankId: input.blankId,
    fileId: stored.id,
    figures: input.analysis,
    aWeightedDbfs: input.analysis.aWeightedDbfs,
    clicksPerMinute: input.analysis.clicksPerMinute,
    verdict: input.analysis.verdict,
    notes: input.notes,
    byUserId: input.userId,
    ...(input.cutAt ? { cutAt: input.cutAt } : {}),
  }).returning()
  return cut!
}

export async function findRecorder(db: Db, id: number): Promise<RecorderRow> {
  const [recorder] = await db.select().from(recorders).where(eq(recorders.id, id))
  if (!recorder) throw createError({ statusCode: 404, statusMessage: 'Not found', message: `recorderId: no recorder has the id ${id}.`, data: { fields: { recorderId: 'no such recorder' } } })
  return recorder
}

/**
 * The blank a test cut is to be made on, checked against the life cycle (the `testCut` row of
 * shared/utils/blankLifecycle.ts): only a fresh surface no open ticket holds. A refusal is a 409
 * naming the blank's state, also put beside the form's blankCode field. With `lock` (inside the
 * transaction that stores the cut) the row stays locked, so a ticket cannot reserve the blank
 * between this check and the move to `cut`.
 */
export async function blankForTestCut(db: Db, code: string, lock = false): Promise<BlankRow> {
  const blank = await findBlankByCode(db, code, { lock, field: 'blankCode' })
  const holder = await blankHolderOf(db, blank.id)
  const refusal = blankActionRefusal('testCut', blank.state, holder)
  if (refusal) {
    throw createError({
      statusCode: 409,
      statusMessage: 'Conflict',
      message: `${blank.code} (${blankStateLabels[blank.state].toLowerCase()}): ${refusal}`,
      data: { state: blank.state, action: 'testCut', fields: { blankCode: `${blankStateLabels[blank.state].toLowerCase()}: ${refusal}` } },
    })
  }
  return blank
}

/**
 * A test cut puts a groove on the blank's current surface: the blank goes to `cut` (so no ticket is
 * offered it as a tested blank any more), and its history says which cut did it. A reshave gives it
 * a fresh surface again.
 */
export async function markBlankTestCut(tx: Transaction, blank: BlankRow, cut: { id: number, recorderName: string }, byUserId: number) {
  const surface = blankCurrentSurface(blank.surfacesUsed)
  await moveBlank(tx, blank.id, {
    from: blank.state,
    to: 'cut',
    reason: `Test cut #${cut.id} with ${cut.recorderName} on surface ${surface}: the surface now carries a groove; reshave it for a fresh one.`,
    byUserId,
    details: { testCutId: cut.id },
  })
}

/** A recorder's test cuts, oldest first, for its chart and table. */
export async function recorderCutHistory(db: Db, recorderId: number, limit = 200) {
  const rows = await db.select({
    id: testCuts.id, cutAt: testCuts.cutAt, aWeightedDbfs: testCuts.aWeightedDbfs, clicksPerMinute: testCuts.clicksPerMinute,
    verdict: testCuts.verdict, notes: testCuts.notes, fileId: testCuts.fileId, blankCode: blanks.code,
  }).from(testCuts).leftJoin(blanks, eq(blanks.id, testCuts.blankId))
    .where(and(eq(testCuts.recorderId, recorderId))).orderBy(desc(testCuts.cutAt), desc(testCuts.id)).limit(limit)
  return rows.reverse()
}

export function isRecorderNameTaken(error: unknown): boolean {
  return isUniqueViolation(error, 'recorders_name_unique')
}
