import type { H3Event } from 'h3'
import type { ZodType } from 'zod'
import { surfaceTests } from '../../db/schema'
import { analyseSurfaceWavInParallel, AudioInputError, incompleteCoverageReason, surfaceCoverage, type SurfaceAnalysis, type SurfaceAnalysisOptions, type SurfaceThresholds } from '../../audio'
import { cylinderFormatTable, playingTimeMinutes, type CylinderFormat } from '#shared/utils/cylinder'
import type { EngineSettings } from '#shared/utils/engineSettings'
import type { BlankRow, SurfaceTestRow } from '#shared/types/rows'
import type { Transaction } from '../platform/db'

const statusMessages: Record<number, string> = {
  400: 'Invalid input',
  413: 'Payload Too Large',
  415: 'Unsupported Media Type',
  422: 'Unprocessable Content',
}

/** Form fields checked like a JSON body: a 400 naming each field. Empty fields count as left out. */
export function surfaceFieldsWith<T>(fields: Record<string, string>, schema: ZodType<T>): T {
  const given = Object.fromEntries(Object.entries(fields).filter(([, value]) => value.trim() !== ''))
  const parsed = schema.safeParse(given)
  if (parsed.success) return parsed.data
  const messages: Record<string, string> = {}
  for (const issue of parsed.error.issues) messages[issue.path.map(String).join('.') || 'body'] ??= issue.message
  throw createError({
    statusCode: 400,
    statusMessage: statusMessages[400],
    message: Object.entries(messages).map(([field, message]) => `${field}: ${message}`).join('; '),
    data: { fields: messages },
  })
}

/**
 * The audio engine's analysis (on two threads where it can); a file it cannot read answers with its status and its
 * message. The answer's Server-Timing header gives the analysis' time and how many threads it took.
 */
export async function analyseSurfaceUpload(event: H3Event, bytes: Uint8Array, options: SurfaceAnalysisOptions): Promise<SurfaceAnalysis> {
  try {
    const started = performance.now()
    const { analysis, threads } = await analyseSurfaceWavInParallel(bytes, options)
    setResponseHeader(event, 'server-timing', `analysis;dur=${(performance.now() - started).toFixed(1)};desc="${threads} thread${threads === 1 ? '' : 's'}"`)
    return analysis
  }
  catch (error) {
    if (error instanceof AudioInputError) {
      throw createError({
        statusCode: error.statusCode,
        statusMessage: statusMessages[error.statusCode] ?? 'Bad Request',
        message: error.message,
        data: { code: error.code, fields: { file: error.message } },
      })
    }
    throw error
  }
}

/** A surface analysis judged against the surface it should cover: `incomplete` when the take is too short. */
export type JudgedSurfaceAnalysis = Omit<SurfaceAnalysis, 'verdict'> & {
  verdict: SurfaceAnalysis['verdict'] | 'incomplete'
  coverage: ReturnType<typeof surfaceCoverage>
}

/**
 * The playing time of a format's surface at the test speed, in seconds: the shop's recordable length ×
 * grooves per inch ÷ rpm (`playingTimeMinutes`, shared/utils/cylinder.ts).
 */
export function surfacePlayingTimeS(format: CylinderFormat, rpm: number, engine: EngineSettings): number {
  return playingTimeMinutes(engine.formats[format].recordableLengthIn, cylinderFormatTable[format].groovesPerInch, rpm) * 60
}

/**
 * Checks that the take covers at least the shop's `coveragePercent` of the surface's playing time; a
 * shorter one is incomplete whatever its figures, with the reason first.
 */
export function judgeSurfaceCoverage(analysis: SurfaceAnalysis, format: CylinderFormat, rpm: number, engine: EngineSettings, thresholds: SurfaceThresholds): JudgedSurfaceAnalysis {
  const coverage = surfaceCoverage(analysis.durationS, surfacePlayingTimeS(format, rpm, engine), thresholds.coveragePercent)
  if (coverage.complete) return { ...analysis, coverage }
  return { ...analysis, coverage, verdict: 'incomplete', reasons: [incompleteCoverageReason(coverage), ...analysis.reasons] }
}

/** The verdict a test keeps unless overruled: incomplete stays incomplete, marginal passes. */
export function storedVerdictWithoutOverrule(computed: JudgedSurfaceAnalysis['verdict']): 'pass' | 'fail' | 'incomplete' {
  return computed === 'incomplete' ? 'incomplete' : surfaceVerdictWithoutOverrule(computed)
}

/** A pass older than the shop's `passMaxAgeDays` is stale: the blank is tested again before it is cut. */
export function surfacePassIsStale(testedAt: Date | string, passMaxAgeDays: number, now = new Date()): boolean {
  return now.getTime() - new Date(testedAt).getTime() > passMaxAgeDays * 86_400_000
}

/** A stored test as the blank's page shows it. */
export function surfaceTestView(test: SurfaceTestRow, testedByName: string | null, passMaxAgeDays?: number) {
  return {
    stale: test.finalVerdict === 'pass' && passMaxAgeDays !== undefined && surfacePassIsStale(test.testedAt, passMaxAgeDays),
    id: test.id,
    surface: test.surface,
    rpm: test.rpm,
    fileUrl: test.fileId ? storedFileUrl(test.fileId) : null,
    aWeightedDbfs: test.aWeightedDbfs,
    rotaryDb: test.rotaryDb,
    clicksPerMinute: test.clicksPerMinute,
    computedVerdict: test.computedVerdict,
    finalVerdict: test.finalVerdict,
    overruled: test.computedVerdict !== 'incomplete' && test.finalVerdict !== 'incomplete' && isSurfaceOverrule(test.computedVerdict, test.finalVerdict),
    overruleReason: test.overruleReason,
    listeningNotes: test.listeningNotes,
    testedBy: testedByName,
    testedAt: test.testedAt,
    figures: test.figures,
  }
}

export interface BlankSurfaceTestInput {
  bytes: Uint8Array
  fileName: string | undefined
  rpm: number
  analysis: SurfaceAnalysis | JudgedSurfaceAnalysis
  finalVerdict: 'pass' | 'fail' | 'incomplete'
  overruleReason: string | null
  listeningNotes: string
  byUserId: number | null
  /** Back-dates the test (the demo seed); now when left out. */
  at?: Date
}

/**
 * Stores a test of the blank's current surface inside the caller's transaction (the blank locked and
 * its state checked): the WAV under a generated id, the figures, and the blank's new state.
 */
export async function recordBlankSurfaceTest(tx: Transaction, blank: BlankRow, input: BlankSurfaceTestInput): Promise<SurfaceTestRow> {
  const surface = blankCurrentSurface(blank.surfacesUsed)
  if (input.analysis.rotaryDb === null) throw new RangeError('a stored surface test needs a once-per-turn figure')
  const incomplete = input.analysis.verdict === 'incomplete' || input.finalVerdict === 'incomplete'
  const finalVerdict = incomplete ? 'incomplete' : input.finalVerdict as 'pass' | 'fail'
  const computedVerdict = incomplete ? 'incomplete' : input.analysis.verdict as SurfaceAnalysis['verdict']
  const overruled = !incomplete && isSurfaceOverrule(computedVerdict as SurfaceAnalysis['verdict'], finalVerdict as 'pass' | 'fail')
  const file = await storeFile(tx, {
    data: input.bytes,
    mime: 'audio/wav',
    purpose: 'surface_test',
    originalName: fileLabel(input.fileName, `${blank.code}-surface-${surface}.wav`),
    isPublic: false,
    uploadedBy: input.byUserId,
  })
  const [row] = await tx.insert(surfaceTests).values({
    blankId: blank.id,
    surface,
    fileId: file.id,
    rpm: input.rpm,
    // Kept as the engine gave them, with the coverage beside (the column's type predates it).
    figures: input.analysis as SurfaceAnalysis,
    aWeightedDbfs: input.analysis.aWeightedDbfs,
    rotaryDb: input.analysis.rotaryDb,
    clicksPerMinute: input.analysis.clicksPerMinute,
    computedVerdict,
    finalVerdict,
    overruleReason: overruled ? input.overruleReason : null,
    listeningNotes: input.listeningNotes,
    testedBy: input.byUserId,
    ...(input.at ? { testedAt: input.at } : {}),
  }).returning()
  const reason = `surface ${surface} tested: ${finalVerdict}${overruled ? ' (computed verdict overruled)' : ''}`
  // An incomplete take judges nothing: the surface is back to shaved, waiting for a full play-through.
  const state = finalVerdict === 'incomplete' ? 'shaved' as const : blankStateAfterTest(finalVerdict)
  await changeBlank(tx, blank, { state }, reason, input.byUserId, input.at)
  return row!
}
