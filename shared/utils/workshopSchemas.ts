import { z } from 'zod'
import { numberInputField } from './benchSchemas'
import { lengthBounds } from './bounds'
import { blankCodePattern, blankStates } from './blankLifecycle'
import { cylinderFormats } from './cylinder'
import { idField, idParamsSchema } from './ids'
import { lengthField } from './length'
import { temperatureField } from './units'

// Inputs of the wax-batch, blank-register and surface-test routes, shared with their forms. Every
// issue names its field, so a 400 can be shown beside the right input.

const workshopText = (field: string, max: number, min = 0) => z.string({ error: `${field} must be text` })
  .trim()
  .min(min, min <= 1 ? `${field} is required` : `${field} needs at least ${min} characters`)
  .max(max, `${field} is at most ${max} characters`)

const wholeNumber = (field: string, min: number, max: number) => numberInputField(field, { integer: true, min, max })

// ——— Wax batches ———

export const waxBatchCodePattern = /^[A-Z0-9]+(?:[-/][A-Z0-9]+)*$/

/**
 * The pour as the trade records it, each optional (null: not recorded). Bounds are slips, not recipes:
 * blank waxes work well below 180 °C and a pot far hotter nears the flash point of paraffin (above
 * 200 °C, from memory); a mould hotter than the wax, a day's cooling or a thousand blanks from one pour
 * would be a typing slip (common practice, no source).
 */
export const castingBounds = {
  meltTempC: { min: 40, max: 180 },
  pourTempC: { min: 40, max: 180 },
  mouldTempC: { min: 0, max: 150 },
  coolingMinutes: { min: 1, max: 1440 },
  castCount: { min: 0, max: 1000 },
  rejectedAtCasting: { min: 0, max: 1000 },
} as const
// Typed in either unit (`302 °F`), stored in °C.
const castingTemp = (field: 'meltTempC' | 'pourTempC' | 'mouldTempC') => temperatureField(field, { stored: 'C', ...castingBounds[field] }).nullable()
const castingCount = (field: 'coolingMinutes' | 'castCount' | 'rejectedAtCasting') => numberInputField(field, { integer: true, ...castingBounds[field] }).nullable()
const castingFields = {
  meltTempC: castingTemp('meltTempC'),
  pourTempC: castingTemp('pourTempC'),
  mouldTempC: castingTemp('mouldTempC'),
  coolingMinutes: castingCount('coolingMinutes'),
  castCount: castingCount('castCount'),
  rejectedAtCasting: castingCount('rejectedAtCasting'),
}
/** Blanks rejected at casting are some of those cast. */
const rejectedWithinCast = (batch: { castCount?: number | null, rejectedAtCasting?: number | null }) => batch.castCount == null || batch.rejectedAtCasting == null || batch.rejectedAtCasting <= batch.castCount
const rejectedTooMany = { message: 'rejectedAtCasting cannot be more than castCount (the blanks cast)', path: ['rejectedAtCasting'] }

export const waxBatchFields = z.object({
  code: z.string({ error: 'code must be text' }).trim().toUpperCase()
    .min(2, 'code needs at least 2 characters').max(30, 'code is at most 30 characters')
    .regex(waxBatchCodePattern, 'code may hold letters, digits and single hyphens or slashes between them (e.g. WB-26-03)'),
  formula: workshopText('formula', 300, 3),
  pourDate: z.iso.date({ error: 'pourDate must be a date like 2026-03-14' }),
  /** Volumetric expansion per kelvin (e.g. 0.00081 for stearic acid); the heat-and-fit calculator uses a third of it. */
  volumetricExpansionPerK: numberInputField('volumetricExpansionPerK', { positive: true, max: 0.01 }),
  softeningPointC: temperatureField('softeningPointC', { stored: 'C', min: 0, max: 200 }).nullable(),
  notes: workshopText('notes', 2000),
  /** The wax formula of the shop's list (Workshop figures) the batch was cast from; null: the shop's first. */
  waxFormulaId: z.string({ error: 'waxFormulaId must be text' }).trim().min(1, 'waxFormulaId is empty').max(40, 'waxFormulaId is too long').nullable(),
  ...castingFields,
})

export const waxBatchCreateSchema = waxBatchFields.extend({
  softeningPointC: waxBatchFields.shape.softeningPointC.default(null),
  waxFormulaId: waxBatchFields.shape.waxFormulaId.default(null),
  notes: waxBatchFields.shape.notes.default(''),
  meltTempC: castingFields.meltTempC.default(null),
  pourTempC: castingFields.pourTempC.default(null),
  mouldTempC: castingFields.mouldTempC.default(null),
  coolingMinutes: castingFields.coolingMinutes.default(null),
  castCount: castingFields.castCount.default(null),
  rejectedAtCasting: castingFields.rejectedAtCasting.default(null),
}).refine(rejectedWithinCast, rejectedTooMany)
export type WaxBatchCreateInput = z.input<typeof waxBatchCreateSchema>

export const waxBatchPatchSchema = waxBatchFields.partial()
  .refine(patch => Object.values(patch).some(value => value !== undefined), { message: 'change at least one field', path: ['body'] })
  .refine(rejectedWithinCast, rejectedTooMany)
export type WaxBatchPatchInput = z.input<typeof waxBatchPatchSchema>

export const waxBatchIdParamsSchema = idParamsSchema

// ——— Blank register ———

/** The most blanks one request creates (a casting session's worth). */
export const BLANKS_PER_CREATE_MAX = 200

export const blankCreateSchema = z.object({
  batchId: idField('batchId', 'choose a wax batch'),
  format: z.enum(cylinderFormats, { error: 'format must be two_minute or four_minute' }),
  count: wholeNumber('count', 1, BLANKS_PER_CREATE_MAX).default(1),
  diameterIn: lengthField('diameterIn', { positive: true, ...lengthBounds.diameterIn }).optional(),
  location: workshopText('location', 120).default(''),
})
export type BlankCreateInput = z.input<typeof blankCreateSchema>

export const blankRegisterSorts = ['code_asc', 'code_desc', 'updated_desc', 'updated_asc', 'diameter_desc', 'diameter_asc', 'surfaces_desc'] as const
export type BlankRegisterSort = typeof blankRegisterSorts[number]

export const blankRegisterSortLabels: Record<BlankRegisterSort, string> = {
  code_asc: 'Code, first to last',
  code_desc: 'Code, last to first',
  updated_desc: 'Changed most recently',
  updated_asc: 'Changed longest ago',
  diameter_desc: 'Largest diameter',
  diameter_asc: 'Smallest diameter',
  surfaces_desc: 'Most surfaces used',
}

export const blankRegisterQuerySchema = z.object({
  state: z.enum(blankStates, { error: `state must be one of ${blankStates.join(', ')}` }).optional(),
  format: z.enum(cylinderFormats, { error: 'format must be two_minute or four_minute' }).optional(),
  batch: z.string({ error: 'batch must be a batch code' }).trim().toUpperCase().max(30, 'batch is too long').optional(),
  q: z.string({ error: 'q must be text' }).trim().max(40, 'q is too long').optional(),
  sort: z.enum(blankRegisterSorts, { error: `sort must be one of ${blankRegisterSorts.join(', ')}` }).default('code_desc'),
  page: wholeNumber('page', 1, 100_000).default(1),
  pageSize: wholeNumber('pageSize', 1, 200).default(25),
})
export type BlankRegisterQuery = z.output<typeof blankRegisterQuerySchema>

export const blankCodeParamsSchema = z.object({
  code: z.string({ error: 'code must be a blank code' }).trim().toUpperCase().regex(blankCodePattern, 'code must look like GW-26-0412'),
})

export const blankPatchSchema = z.object({
  location: workshopText('location', 120).optional(),
  notes: workshopText('notes', 2000).optional(),
  diameterIn: lengthField('diameterIn', { positive: true, ...lengthBounds.diameterIn }).nullable().optional(),
}).refine(patch => Object.values(patch).some(value => value !== undefined), { message: 'change at least one of location, notes or diameterIn', path: ['body'] })
export type BlankPatchInput = z.input<typeof blankPatchSchema>

/** One reaming session: the overhang read before and after, the reamings done, the room's temperature. */
export const blankReamingSchema = z.object({
  overhangBeforeIn: lengthField('overhangBeforeIn', { allowNegative: true, ...lengthBounds.overhangIn }),
  overhangAfterIn: lengthField('overhangAfterIn', { allowNegative: true, ...lengthBounds.overhangIn }),
  reamings: wholeNumber('reamings', 1, 40),
  /** °F as stored; a text may name its unit (`23 C`), as the shop's own unit is typed. */
  roomTemperatureF: temperatureField('roomTemperatureF', { stored: 'F', min: 32, max: 120 }),
  /** A reaming after shaving has begun: the maker accepts that the current surface is spent. */
  refit: z.boolean({ error: 'refit must be true or false' }).default(false),
  notes: workshopText('notes', 1000).default(''),
}).superRefine((session, ctx) => {
  // Each reaming seats the blank further on, so the overhang reading can only grow.
  if (session.overhangAfterIn < session.overhangBeforeIn - 1e-9) {
    ctx.addIssue({ code: 'custom', path: ['overhangAfterIn'], message: 'overhangAfterIn: the overhang grows as the bore opens; it cannot be less after reaming than before' })
  }
})
export type BlankReamingInput = z.input<typeof blankReamingSchema>

/** One shaving session on the current surface: the wheel setting, the passes, the diameter after. */
export const blankShavingSchema = z.object({
  /** Largest diameter read before shaving; the blank's recorded diameter when left out. */
  diameterBeforeIn: lengthField('diameterBeforeIn', { positive: true, ...lengthBounds.diameterIn }).optional(),
  /** Smallest diameter read around the blank, for the depth the plan must clean up. */
  lowDiameterIn: lengthField('lowDiameterIn', { positive: true, ...lengthBounds.diameterIn }).optional(),
  wheelDegrees: numberInputField('wheelDegrees', { positive: true, max: 360 }).default(45),
  passes: wholeNumber('passes', 1, 50).default(1),
  diameterAfterIn: lengthField('diameterAfterIn', { positive: true, ...lengthBounds.diameterIn }),
  notes: workshopText('notes', 1000).default(''),
})
export type BlankShavingInput = z.input<typeof blankShavingSchema>

/**
 * A new surface on a blank whose surface is spent; the measurements are optional. `surface` is the
 * surface the maker means to leave (the one the page showed as current): a repeated or late request
 * finds the blank already on the next surface and is refused, so one click never spends two.
 */
export const blankReshaveSchema = z.object({
  surface: wholeNumber('surface', 1, 1000),
  reason: workshopText('reason', 500).default(''),
  wheelDegrees: numberInputField('wheelDegrees', { positive: true, max: 360 }).optional(),
  passes: wholeNumber('passes', 1, 50).optional(),
  diameterAfterIn: lengthField('diameterAfterIn', { positive: true, ...lengthBounds.diameterIn }).optional(),
})
export type BlankReshaveInput = z.input<typeof blankReshaveSchema>

export const blankScrapSchema = z.object({
  reason: workshopText('reason', 500, 3),
})

// ——— Surface tests ———

export const surfaceTestVerdicts = ['pass', 'fail'] as const

const overruleReasonField = workshopText('overruleReason', 1000)

/** The text fields sent beside the WAV (multipart form fields arrive as text). */
export const surfaceTestUploadFieldsSchema = z.object({
  rpm: numberInputField('rpm', { integer: true, min: 30, max: 300 }).default(160),
  listeningNotes: workshopText('listeningNotes', 4000).default(''),
  finalVerdict: z.enum(surfaceTestVerdicts, { error: 'finalVerdict must be pass or fail' }).optional(),
  overruleReason: overruleReasonField.optional(),
})

export const surfaceAnalyseFieldsSchema = z.object({
  rpm: numberInputField('rpm', { min: 30, max: 300 }).default(160),
})

export const surfaceTestPatchSchema = z.object({
  listeningNotes: workshopText('listeningNotes', 4000).optional(),
  finalVerdict: z.enum(surfaceTestVerdicts, { error: 'finalVerdict must be pass or fail' }).optional(),
  overruleReason: overruleReasonField.nullable().optional(),
}).refine(patch => Object.values(patch).some(value => value !== undefined), { message: 'change listeningNotes, finalVerdict or overruleReason', path: ['body'] })
export type SurfaceTestPatchInput = z.input<typeof surfaceTestPatchSchema>

export const surfaceTestParamsSchema = blankCodeParamsSchema.extend({ id: idField('id') })

export const SURFACE_OVERRULE_REASON_REQUIRED = 'say why the computed verdict is overruled (what you heard); the reason is kept with the test'

// ——— What the blank log keeps (blank_log.data by kind) ———

export interface BlankReamingLogData {
  overhangBeforeIn: number
  overhangAfterIn: number
  reamings: number
  roomTemperatureF: number
  refit: boolean
  notes: string
  /** The engine's plan from the reading before, as it stood at the time. */
  plan: { status: string, reamingsToFit: number, sets: number, targetIn: number, expectedAfterIn: number, remainingAfter: number, warnings: string[] }
}

export interface BlankShavingLogData {
  surface: number
  diameterBeforeIn: number
  lowDiameterIn: number | null
  wheelDegrees: number
  passes: number
  diameterAfterIn: number
  notes: string
  plan: { infeedIn: number, depthToCleanUpIn: number, passesToCleanUp: number, expectedAfterIn: number, surfacesLeft: number, warnings: string[] }
}

export interface BlankReshaveLogData {
  fromState: string
  surfaceBefore: number
  surfaceNow: number
  diameterBeforeIn: number | null
  diameterAfterIn: number | null
  wheelDegrees: number | null
  passes: number | null
  reason: string
}

export interface BlankStateLogData {
  from: string | null
  to: string
  reason: string
  /** The ticket or test cut that moved the blank, when one did. */
  ticketId?: number
  testCutId?: number
}

// ——— What the pages show (the routes' answers, as they arrive in the browser) ———

/** The figures of a surface analysis that the pages show (the analyse route's answer, a stored test's `figures`). */
export interface SurfaceFiguresView {
  durationS: number
  sampleRate: number
  channels: number
  rpm: number
  peakDbfs: number
  rmsDbfs: number
  aWeightedDbfs: number
  crestDb: number
  rotaryDb: number | null
  rotaryHz: number | null
  rotaryDetected: boolean
  clickCount: number
  clicksPerMinute: number
  /** `incomplete`: the take covers too little of the surface's playing time (the reason comes first). */
  verdict: 'pass' | 'marginal' | 'fail' | 'incomplete'
  reasons: string[]
  /** How much of the surface's playing time the take covers (when the format is known). */
  coverage?: { durationS: number, playingTimeS: number, percent: number, required: number, complete: boolean }
  spectrum: { hz: number, db: number }[]
  envelope: number[]
  envelopeSeconds: number
}

/** A stored surface test as the blank's page shows it. */
export interface SurfaceTestView {
  id: number
  surface: number
  rpm: number
  fileUrl: string | null
  computedVerdict: 'pass' | 'marginal' | 'fail' | 'incomplete'
  finalVerdict: 'pass' | 'fail' | 'incomplete'
  /** A pass older than the shop's passMaxAgeDays: to be tested again before it is cut. */
  stale: boolean
  overruled: boolean
  overruleReason: string | null
  listeningNotes: string
  testedBy: string | null
  testedAt: string
  figures: SurfaceFiguresView
}
