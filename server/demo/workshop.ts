// The invented demo workshop's wax and blanks: three batches of made-up formulas and forty blanks
// (GW-26-0001 …) in every state of their life cycle, each with the logs that brought it there, and
// surface tests analysed from synthetic play-throughs whose answers are known: white or softened
// noise at a set level, with or without a once-per-turn swell and clicks (server/audio/synth.ts).
import { createHash } from 'node:crypto'
import { eq, inArray } from 'drizzle-orm'
import { cylinderFormats, type CylinderFormat } from '#shared/utils/cylinder'
import { blankLog, blanks, files, settings, surfaceTests, users, waxBatches } from '../db/schema'
import { analyseSurfaceWav, encodeWav, makeSurfaceSignal, surfaceThresholdsSchema, type SurfaceAnalysis, type SurfaceThresholds, type SurfaceWavOptions } from '../audio'
import { judgeSurfaceCoverage, storedVerdictWithoutOverrule, surfacePlayingTimeS, type JudgedSurfaceAnalysis } from '../utils/workshop/blankSurfaceTests'
import { blankStateAfterTest, isSurfaceOverrule, type BlankState } from '#shared/utils/blankLifecycle'
import type { EngineSettings } from '#shared/utils/engineSettings'
import type { BlankReshaveLogData, BlankStateLogData } from '#shared/utils/workshopSchemas'
import type { Database } from '../utils/platform/db'
import { uploadStorage } from '../utils/platform/uploads'
import { blankReamingRecord, blankShavingRecord, drawBlankCodes } from '../utils/workshop/blanks'
import { getSetting } from '../utils/workshop/settings'

const DAY_MS = 86_400_000
// The lowest rate the surface-test reader accepts (22.05 kHz, mono, 16-bit) keeps the full-length takes small.
const SAMPLE_RATE = 22_050
// Short play-throughs keep seeding quick; 5 s at 160 rpm is over the 10 turns the rotary measure needs.
// Each take is synthesised as a segment of whole turns (16 turns at 160 rpm = 6 s) repeated to the
// surface's full playing time, so every stored test covers its surface as a real play-through must.
const SEGMENT_SECONDS = 6
const RPM = 160

const demoBatches = [
  { code: 'WB-26-01', waxFormulaId: 'stearic_acid', formula: 'stearic acid 70 / paraffin 20 / carnauba 10', pourDate: '2026-03-04', volumetricExpansionPerK: 760e-6, softeningPointC: 61, notes: 'The house black. Poured in the cool of the morning; a few blanks cracked where the mould was cold.' },
  { code: 'WB-26-02', waxFormulaId: 'stearic_acid', formula: 'stearic acid 80 / ceresin 12 / carnauba 8', pourDate: '2026-06-17', volumetricExpansionPerK: 785e-6, softeningPointC: 64, notes: 'Harder and quieter; a little more carnauba against summer heat.' },
  { code: 'WB-26-03', waxFormulaId: 'paraffin', formula: 'paraffin 55 / stearic acid 35 / beeswax 10', pourDate: '2026-10-08', volumetricExpansionPerK: 660e-6, softeningPointC: 52, notes: 'Amber practice wax for collectors with old cutting styli. Softens early: ship in cool weather only.' },
] as const

/** A synthetic play-through, and the maker's word on it when it differs from the computed verdict. */
interface DemoSurface {
  sound: Pick<SurfaceWavOptions, 'levelDbfs' | 'swellDepth' | 'clicks' | 'colour'>
  notes?: string
  overrule?: { verdict: 'pass' | 'fail', reason: string }
}

const quiet: DemoSurface = { sound: { levelDbfs: -58, swellDepth: 0.02 }, notes: 'Even, quiet hiss from end to end.' }
const soft: DemoSurface = { sound: { levelDbfs: -56, swellDepth: 0.03, colour: 'soft' }, notes: 'Soft, dark surface noise; nothing per turn.' }
const hissy: DemoSurface = { sound: { levelDbfs: -48, swellDepth: 0.02 }, notes: 'A touch of hiss, steady; fine for speech.' }
const oneClick: DemoSurface = { sound: { levelDbfs: -57, clicks: 1 }, notes: 'One tick near the start, otherwise clean.' }
const loud: DemoSurface = { sound: { levelDbfs: -41, swellDepth: 0.02 }, notes: 'Coarse roar all the way: the cutter was dull.' }
const wobbly: DemoSurface = { sound: { levelDbfs: -57, swellDepth: 0.3 }, notes: 'A swish on every turn.' }
const clicky: DemoSurface = { sound: { levelDbfs: -57, clicks: 2 }, notes: 'Two sharp clicks.' }

type Ending = 'cast' | 'reamed' | 'shaved' | 'tested' | 'cut' | 'shipped' | 'scrapped'

interface DemoBlank {
  batch: 0 | 1 | 2
  format: CylinderFormat
  /** Surface tests in order; each test after a failed one comes after a reshave. */
  surfaces?: DemoSurface[]
  /** Where the story stops (`tested`: as the last test left it). */
  end: Ending
  location: string
  scrapReason?: string
  /** Reamed well past the fit: the way a blank is spoilt at the reamer. */
  overReamed?: boolean
  /** Only the first set of reamings done so far. */
  partlyReamed?: boolean
  /** Its surface test is from long ago: stale, to be tested again. */
  staleTest?: boolean
}

const two = 'two_minute' as const
const four = 'four_minute' as const
const rack = (shelf: number) => `Rack ${shelf < 3 ? 'A' : 'B'}, shelf ${shelf}`

// Forty blanks: at least six of each format tested, passed and held by no ticket.
const demoBlankPlan: DemoBlank[] = [
  { batch: 0, format: two, surfaces: [quiet], end: 'tested', location: rack(1) },
  { batch: 0, format: two, surfaces: [hissy], end: 'tested', location: rack(1) },
  { batch: 0, format: four, surfaces: [quiet], end: 'tested', location: rack(2) },
  { batch: 0, format: four, surfaces: [loud, quiet], end: 'tested', location: rack(2) },
  { batch: 0, format: two, surfaces: [clicky], end: 'tested', location: 'Reshave tray' },
  { batch: 0, format: four, surfaces: [quiet], end: 'shipped', location: 'Shipped' },
  { batch: 0, format: four, surfaces: [quiet], end: 'tested', location: rack(2), staleTest: true },
  { batch: 0, format: two, surfaces: [wobbly, wobbly], end: 'scrapped', location: 'Remelt pot', scrapReason: 'Swishes on every turn after two surfaces: the bore sits off centre. Remelt.' },
  { batch: 0, format: four, surfaces: [quiet], end: 'tested', location: rack(2) },
  { batch: 0, format: two, surfaces: [quiet], end: 'cut', location: 'Cutting bench' },
  { batch: 0, format: four, surfaces: [quiet], end: 'tested', location: rack(2) },
  { batch: 0, format: two, surfaces: [wobbly, oneClick], end: 'tested', location: rack(1) },
  { batch: 0, format: four, surfaces: [loud, loud, quiet], end: 'tested', location: rack(2) },
  { batch: 0, format: two, surfaces: [{ ...hissy, notes: 'A faint whistle rising and falling under the hiss.', overrule: { verdict: 'fail', reason: 'A whistle under the hiss that the figures do not catch; not good enough for a message.' } }], end: 'tested', location: 'Reshave tray' },
  { batch: 0, format: four, surfaces: [{ ...clicky, notes: 'Two clicks, both in the first turn.', overrule: { verdict: 'pass', reason: 'Both clicks were dust on the stylus at the start; a second play-through was clean.' } }], end: 'tested', location: rack(2) },
  { batch: 0, format: two, end: 'scrapped', location: 'Remelt pot', scrapReason: 'Cracked while cooling on the cold side of the mould.' },
  { batch: 1, format: two, surfaces: [quiet], end: 'tested', location: rack(3) },
  { batch: 1, format: two, surfaces: [quiet], end: 'tested', location: rack(3) },
  { batch: 1, format: four, surfaces: [quiet], end: 'tested', location: rack(4) },
  { batch: 1, format: four, surfaces: [hissy], end: 'tested', location: rack(4) },
  { batch: 1, format: two, surfaces: [soft], end: 'tested', location: rack(3) },
  { batch: 1, format: four, surfaces: [soft], end: 'tested', location: rack(4) },
  { batch: 1, format: two, surfaces: [loud], end: 'tested', location: 'Reshave tray' },
  { batch: 1, format: four, surfaces: [wobbly, quiet], end: 'tested', location: rack(4) },
  { batch: 1, format: four, surfaces: [quiet], end: 'cut', location: 'Cutting bench' },
  { batch: 1, format: two, surfaces: [soft], end: 'shipped', location: 'Shipped' },
  { batch: 1, format: four, surfaces: [soft], end: 'tested', location: rack(4) },
  { batch: 1, format: two, end: 'shaved', location: 'Listening bench' },
  { batch: 1, format: four, end: 'shaved', location: 'Listening bench' },
  { batch: 1, format: two, end: 'scrapped', overReamed: true, location: 'Remelt pot', scrapReason: 'Over-reamed: sits a quarter inch past the fit and rocks on the mandrel.' },
  { batch: 2, format: two, surfaces: [quiet], end: 'tested', location: rack(5) },
  { batch: 2, format: four, surfaces: [soft], end: 'tested', location: rack(5) },
  { batch: 2, format: four, surfaces: [quiet], end: 'tested', location: rack(5) },
  { batch: 2, format: two, end: 'shaved', location: 'Listening bench' },
  { batch: 2, format: two, end: 'reamed', location: 'Shaving bench' },
  { batch: 2, format: four, end: 'reamed', location: 'Shaving bench' },
  { batch: 2, format: four, end: 'reamed', partlyReamed: true, location: 'Reaming bench' },
  { batch: 2, format: two, end: 'cast', location: 'Cooling shelf' },
  { batch: 2, format: four, end: 'cast', location: 'Cooling shelf' },
  { batch: 2, format: two, end: 'cast', location: 'Cooling shelf' },
]

const wholeSixteenths = (n: number) => n / 16
/** Diameters as a micrometer reads them, to a ten-thousandth of an inch. */
const toTenThousandths = (inches: number) => Math.round(inches * 10_000) / 10_000

interface LogDraft {
  kind: typeof blankLog.$inferInsert['kind']
  data: object
  at: Date
}

interface TestDraft {
  surface: number
  take: DemoTake
  analysis: JudgedSurfaceAnalysis
  finalVerdict: 'pass' | 'fail'
  overruleReason: string | null
  listeningNotes: string
  at: Date
}

interface DemoTake { key: string, bytes: Uint8Array, analysis: JudgedSurfaceAnalysis }

/**
 * A full-length play-through of one kind of demo surface, made and analysed once and shared by every
 * demo test of that kind (the file too), so the seed stays quick and small: as long as the longer
 * format's surface, it covers a surface of either format.
 */
function demoTakeMaker(engine: EngineSettings, thresholds: SurfaceThresholds) {
  const takes = new Map<string, Omit<DemoTake, 'analysis'> & { raw: ReturnType<typeof analyseSurfaceWav> }>()
  const seconds = Math.max(...cylinderFormats.map(format => surfacePlayingTimeS(format, RPM, engine)))
  return (surface: DemoSurface, format: CylinderFormat): DemoTake => {
    const sound = JSON.stringify(surface.sound)
    let take = takes.get(sound)
    if (!take) {
      const segment = makeSurfaceSignal({ seconds: SEGMENT_SECONDS, sampleRate: SAMPLE_RATE, rpm: RPM, seed: 1000 + takes.size, ...surface.sound }).samples
      const repeats = Math.ceil(seconds / SEGMENT_SECONDS)
      const samples = new Float32Array(segment.length * repeats)
      for (let i = 0; i < repeats; i++) samples.set(segment, i * segment.length)
      const bytes = encodeWav(samples, { sampleRate: SAMPLE_RATE })
      // A fixed id from what the take is, so that seeding again reuses the stored file.
      const key = createHash('sha1').update(`${sound}-${seconds}-${SEGMENT_SECONDS}-${SAMPLE_RATE}-${takes.size}`).digest('hex').slice(0, 16)
      take = { key, bytes, raw: analyseSurfaceWav(bytes, { rpm: RPM, thresholds }) }
      takes.set(sound, take)
    }
    return { key: take.key, bytes: take.bytes, analysis: judgeSurfaceCoverage(take.raw, format, RPM, engine, thresholds) }
  }
}

/**
 * One blank's story worked out in memory, back-dated from its batch's pour date: the state it ends
 * in, its log and its surface tests (analysed here). The seed then writes all blanks in a few inserts.
 */
function demoBlankStory(plan: DemoBlank, index: number, castAt: Date, castDiameterIn: number, engine: EngineSettings, takeOf: ReturnType<typeof demoTakeMaker>, now: Date) {
  let step = 0
  let clock = castAt.getTime()
  const at = () => new Date(clock + (step += 1) * DAY_MS)
  const story = { state: 'cast' as BlankState, diameterIn: castDiameterIn, surfacesUsed: 0, updatedAt: castAt, log: [] as LogDraft[], tests: [] as TestDraft[] }
  const log = (kind: LogDraft['kind'], data: object, when: Date) => story.log.push({ kind, data, at: when })
  const move = (to: BlankState, reason: string, when = at()) => {
    if (to !== story.state) log('state', { from: story.state, to, reason } satisfies BlankStateLogData, when)
    story.state = to
    story.updatedAt = when
  }
  log('state', { from: null, to: 'cast', reason: `cast from batch ${demoBatches[plan.batch].code}` } satisfies BlankStateLogData, castAt)
  if (plan.end === 'cast') return story
  if (plan.end === 'scrapped' && !plan.surfaces && !plan.overReamed) {
    move('scrapped', plan.scrapReason!)
    return story
  }

  // Reaming: from 3/16 … 8/16 in short of the 7/16 in fit, a set of four at a time.
  const short = 3 + (index % 6)
  let overhang = engine.reaming.targetOverhangIn - wholeSixteenths(short)
  let left = plan.overReamed ? short + 4 : short
  for (let session = 0; left > 0 && !(plan.partlyReamed && session === 1); session++) {
    const reamings = Math.min(4, left)
    const when = at()
    log('reaming', blankReamingRecord({ overhangBeforeIn: overhang, overhangAfterIn: overhang + wholeSixteenths(reamings), reamings, roomTemperatureF: 72 + (index % 5), refit: false, notes: '' }, engine), when)
    move('reamed', 'bore reamed', when)
    overhang += wholeSixteenths(reamings)
    left -= reamings
  }
  if (plan.end === 'reamed') return story
  if (plan.overReamed) {
    move('scrapped', plan.scrapReason!)
    return story
  }

  // The first surface, shaved from the cast diameter until the cut reaches the low spot.
  const infeed = engine.shaving.infeedPer45DegreesIn
  const low = toTenThousandths(castDiameterIn - 0.006 - (index % 3) * 0.002)
  const passes = Math.ceil((castDiameterIn - low) / 2 / infeed - 1e-6)
  const shaving = blankShavingRecord({ surface: 1, diameterBeforeIn: castDiameterIn, lowDiameterIn: low, wheelDegrees: 45, passes, diameterAfterIn: toTenThousandths(castDiameterIn - 2 * passes * infeed), notes: '' }, engine)
  let when = at()
  log('shaving', shaving, when)
  story.diameterIn = shaving.diameterAfterIn
  move('shaved', 'surface 1 shaved', when)

  // The blank waits shaved until a few weeks ago, so that its surface test is recent (a pass goes stale
  // after the shop's passMaxAgeDays); a blank marked `staleTest` keeps its test from long ago.
  if (plan.surfaces && !plan.staleTest) {
    const recent = now.getTime() - (60 - (index % 40)) * DAY_MS
    if (recent > clock + step * DAY_MS) {
      clock = recent
      step = 0
    }
  }
  for (const [n, surface] of (plan.surfaces ?? []).entries()) {
    if (n > 0) {
      // A new surface after the last one was heard and failed.
      const before = story.diameterIn
      const after = toTenThousandths(before - 2 * infeed)
      when = at()
      log('reshave', { fromState: story.state, surfaceBefore: story.surfacesUsed + 1, surfaceNow: story.surfacesUsed + 2, diameterBeforeIn: before, diameterAfterIn: after, wheelDegrees: 45, passes: 1, reason: 'failed its surface test' } satisfies BlankReshaveLogData, when)
      story.diameterIn = after
      story.surfacesUsed += 1
      move('shaved', `reshaved: surface ${story.surfacesUsed} spent`, when)
    }
    const take = takeOf(surface, plan.format)
    const analysis = take.analysis
    if (analysis.verdict === 'incomplete') throw new Error('a demo take must cover its surface')
    const finalVerdict = surface.overrule?.verdict ?? storedVerdictWithoutOverrule(analysis.verdict) as 'pass' | 'fail'
    const overruled = isSurfaceOverrule(analysis.verdict, finalVerdict)
    when = at()
    story.tests.push({ surface: story.surfacesUsed + 1, take, analysis, finalVerdict, overruleReason: overruled ? surface.overrule!.reason : null, listeningNotes: surface.notes ?? '', at: when })
    move(blankStateAfterTest(finalVerdict), `surface ${story.surfacesUsed + 1} tested: ${finalVerdict}${overruled ? ' (computed verdict overruled)' : ''}`, when)
  }

  if (plan.end === 'cut') {
    move('reserved', 'set aside to record a title for the shop\'s stock')
    move('cut', 'recorded for stock')
  }
  if (plan.end === 'shipped') move('shipped', 'sold as a plain blank and shipped')
  if (plan.end === 'scrapped') move('scrapped', plan.scrapReason!)
  return story
}

/**
 * Seeds the demo wax batches and blanks once: when the demo batches exist already, it does nothing.
 * Also stores the `surface` limits (defaults) unless the shop has its own.
 */
export async function seedDemoWorkshop(db: Database) {
  await db.insert(settings).values({ key: 'surface', value: surfaceThresholdsSchema.parse({}) }).onConflictDoNothing()
  const existing = await db.select({ id: waxBatches.id }).from(waxBatches).where(inArray(waxBatches.code, demoBatches.map(batch => batch.code)))
  if (existing.length > 0) return

  const engine = await getSetting('engine', db)
  const thresholds = await getSetting('surface', db)
  const [maker] = await db.select({ id: users.id }).from(users).where(eq(users.role, 'maker')).orderBy(users.id).limit(1)
  const makerId = maker?.id ?? null
  const takeOf = demoTakeMaker(engine, thresholds)
  const now = new Date()
  const stories = demoBlankPlan.map((plan, index) => {
    const castAt = new Date(Date.parse(`${demoBatches[plan.batch].pourDate}T08:00:00Z`) + DAY_MS + index * 3_600_000)
    // As cast, a little over the standard 2.19 in so that shaving has something to take.
    const castDiameterIn = toTenThousandths(2.204 + (index % 5) * 0.001)
    return { plan, castAt, story: demoBlankStory(plan, index, castAt, castDiameterIn, engine, takeOf, now) }
  })

  await db.transaction(async (tx) => {
    const batches = await tx.insert(waxBatches).values(demoBatches.map(batch => ({ ...batch }))).returning()
    const codes = await drawBlankCodes(tx, demoBlankPlan.length, new Date(`${demoBatches[0].pourDate}T12:00:00Z`))
    const rows = await tx.insert(blanks).values(stories.map(({ plan, castAt, story }, index) => ({
      code: codes[index]!,
      batchId: batches[plan.batch]!.id,
      format: plan.format,
      state: story.state,
      diameterIn: story.diameterIn,
      surfacesUsed: story.surfacesUsed,
      location: plan.location,
      createdAt: castAt,
      updatedAt: story.updatedAt,
    }))).returning({ id: blanks.id, code: blanks.code })
    await tx.insert(blankLog).values(stories.flatMap(({ story }, index) => story.log.map(entry => ({
      blankId: rows[index]!.id,
      kind: entry.kind,
      data: entry.data as Record<string, unknown>,
      byUserId: makerId,
      at: entry.at,
    }))))
    const tests: (typeof surfaceTests.$inferInsert)[] = []
    const stored = new Set<string>()
    const storage = await uploadStorage()
    for (const [index, { story }] of stories.entries()) {
      for (const test of story.tests) {
        // One stored file per kind of demo take, shared by the tests that used it, under a fixed id.
        const fileId = `demo-surface-${test.take.key}`
        if (!stored.has(fileId)) {
          const kept = await storage.getItemRaw<Uint8Array>(fileId).catch(() => null)
          if (!kept?.byteLength) await storage.setItemRaw(fileId, test.take.bytes)
          await tx.insert(files).values({ id: fileId, purpose: 'surface_test', mime: 'audio/wav', bytes: test.take.bytes.byteLength, originalName: `${fileId}.wav`, isPublic: false, uploadedBy: makerId }).onConflictDoNothing()
          stored.add(fileId)
        }
        tests.push({
          blankId: rows[index]!.id,
          surface: test.surface,
          fileId,
          rpm: RPM,
          figures: test.analysis as SurfaceAnalysis,
          aWeightedDbfs: test.analysis.aWeightedDbfs,
          rotaryDb: test.analysis.rotaryDb!,
          clicksPerMinute: test.analysis.clicksPerMinute,
          computedVerdict: test.analysis.verdict,
          finalVerdict: test.finalVerdict,
          overruleReason: test.overruleReason,
          listeningNotes: test.listeningNotes,
          testedBy: makerId,
          testedAt: test.at,
        })
      }
    }
    await tx.insert(surfaceTests).values(tests)
  })
}
