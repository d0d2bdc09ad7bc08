import { z } from 'zod'
import { CUSTOM_SCRIPT_MAX_CHARS } from './benchSchemas'
import { cylinderFormats } from './cylinder'

/*
 * Personal messages recorded to order: the quote the order form asks for, the message as the checkout
 * takes it, and the customer's answers to a proof. (The fit meter's own schema is `customFitBodySchema`.)
 */

/** Longest recording a customer may send for the maker to play into the horn (a 4-minute record at slow speed holds less). */
export const VOICE_SECONDS_MAX = 600
/** Most messages one checkout takes. */
export const CUSTOM_MESSAGES_MAX = 5

const isoDate = (field: string) => z.string({ error: `${field} must be a date (YYYY-MM-DD)` })
  .regex(/^\d{4}-\d{2}-\d{2}$/, `${field} must be a date (YYYY-MM-DD)`)
  .refine(value => !Number.isNaN(Date.parse(`${value}T00:00:00Z`)) && new Date(`${value}T00:00:00Z`).toISOString().startsWith(value), `${field} is not a real date`)

const scriptField = z.string({ error: 'script must be text' })
  .max(CUSTOM_SCRIPT_MAX_CHARS, `script must be at most ${CUSTOM_SCRIPT_MAX_CHARS} characters`)

const messageFields = {
  format: z.enum(cylinderFormats, { error: 'format must be two_minute or four_minute' }),
  rpm: z.number({ error: 'rpm must be a number' }).int('rpm must be a whole number').min(60, 'rpm must be at least 60').max(300, 'rpm must be at most 300').optional(),
  voice: z.enum(['maker', 'upload'], { error: 'voice must be maker (the maker speaks your script) or upload (your own recording)' }),
  rush: z.boolean({ error: 'rush must be true or false' }).default(false),
}

export const customQuoteBodySchema = z.object({
  script: scriptField.optional(),
  voiceSeconds: z.number({ error: 'voiceSeconds must be a number' }).min(0, 'voiceSeconds cannot be negative').max(VOICE_SECONDS_MAX, `voiceSeconds must be at most ${VOICE_SECONDS_MAX}`).optional(),
  ...messageFields,
  wishedDate: isoDate('wishedDate').optional(),
})
export type CustomQuoteBody = z.output<typeof customQuoteBodySchema>

const text = (field: string, max: number) => z.string({ error: issue => issue.input === undefined ? `${field} is required` : `${field} must be text` })
  .trim().min(1, `${field} is required`).max(max, `${field} must be at most ${max} characters`)

/** One message as the checkout takes it. */
export const customMessageOrderSchema = z.object({
  occasion: text('occasion', 80),
  recipientName: text('recipientName', 80),
  script: scriptField.default(''),
  voiceUploadId: z.string({ error: 'voiceUploadId must be text' }).trim().regex(/^[A-Za-z0-9_-]{8,64}$/, 'voiceUploadId is not an upload of ours').optional(),
  ...messageFields,
  wishedDate: isoDate('wishedDate'),
  notes: z.string({ error: 'notes must be text' }).trim().max(1000, 'notes must be at most 1000 characters').default(''),
})
export type CustomMessageOrder = z.output<typeof customMessageOrderSchema>

export const customMessagesField = z.array(customMessageOrderSchema, { error: 'customMessages must be a list' })
  .max(CUSTOM_MESSAGES_MAX, `customMessages: at most ${CUSTOM_MESSAGES_MAX} messages in one order`)

/** A guest's signed link (`t`) may come in the body as well as in the address. */
export const proofApproveBodySchema = z.object({
  t: z.string({ error: 't must be text' }).max(100, 't is too long').optional(),
})

export const proofRecutBodySchema = z.object({
  t: z.string({ error: 't must be text' }).max(100, 't is too long').optional(),
  note: text('note', 1000),
  /** Asked for a re-cut past the free ones, agreeing to its price. */
  pay: z.boolean({ error: 'pay must be true or false' }).default(false),
})

export const proofParamsSchema = z.object({
  number: z.string().trim().min(1, 'number is required').max(40, 'number is too long'),
  proofId: z.union([z.string(), z.number()]).transform((raw, ctx) => {
    const value = Number(raw)
    if (!/^\d{1,10}$/.test(String(raw)) || value < 1 || value > 2_147_483_647) {
      ctx.addIssue({ code: 'custom', message: 'proofId must be a whole number' })
      return z.NEVER
    }
    return value
  }),
})

/** What the customer sees of each proof answer. */
export const proofAnswerLabels = { waiting: 'Waiting for your answer', approved: 'Approved', recut: 'Re-cut asked for' } as const
