import { z } from 'zod'
import { idField } from './ids'
import { formatCushioning } from './packing'
import { weightField } from './units'
import type { UnitPreferences } from './units'

/*
 * Dispatch: what the shipper sends when checking the heat, packing and shipping an order, what a
 * customer sends with a breakage claim and what the maker answers. Shared by the routes (which
 * enforce it) and the pages (whose forms send it). No prices: the shipper never sees them.
 */

/** The packing checklist, in the order a packer works; `double_box` applies only when the engine double-boxes. */
export const packingChecklistIds = ['tubes', 'cushioning', 'double_box', 'slip', 'marks'] as const
export type PackingChecklistId = typeof packingChecklistIds[number]

/** The checklist for one parcel: each line that applies, with its label (depths in the shop's length unit, inches when left out). */
export function packingChecklist(options: { cushioningIn: number, doubleBox: boolean }, prefs?: Pick<UnitPreferences, 'length' | 'locale'>): { id: PackingChecklistId, label: string }[] {
  return [
    { id: 'tubes', label: 'Each cylinder in its own padded tube' },
    { id: 'cushioning', label: `At least ${formatCushioning(options.cushioningIn, prefs)} of cushioning on every side` },
    ...(options.doubleBox ? [{ id: 'double_box' as const, label: 'Inner box inside the outer box, cushioned all round' }] : []),
    { id: 'slip', label: 'Packing slip inside' },
    { id: 'marks', label: 'FRAGILE and this-way-up marks on the outside' },
  ]
}

export const dispatchHeatCheckSchema = z.object({
  forecastHigh: z.number({ error: 'forecastHigh must be a number (the forecast high at the destination)' })
    .min(-60, 'forecastHigh must be at least -60').max(140, 'forecastHigh must be at most 140'),
  unit: z.enum(['C', 'F'], { error: 'unit must be C or F' }).default('C'),
  transitDays: z.number({ error: 'transitDays must be a number of days' }).int('transitDays must be whole days')
    .min(0, 'transitDays cannot be negative').max(14, 'transitDays is at most 14'),
}).superRefine((input, ctx) => {
  // A forecast in °C above 60 is a slip of the unit, not weather.
  if (input.unit === 'C' && input.forecastHigh > 60) ctx.addIssue({ code: 'custom', path: ['forecastHigh'], message: 'forecastHigh is above 60 °C: did you mean °F?' })
})
export type DispatchHeatCheckInput = z.output<typeof dispatchHeatCheckSchema>

const boxIdField = z.string({ error: 'boxId must be the id of a box in the settings' }).trim().min(1, 'boxId must be the id of a box in the settings').max(40, 'boxId is too long')

export const dispatchBoxQuerySchema = z.object({ boxId: boxIdField.optional() })

export const dispatchPackSchema = z.object({
  boxId: boxIdField.optional(),
  // Grams, or a figure with its unit (`1 lb 4 oz`, `1.45 kg`, `575 g`), kept to the whole gram.
  weighedG: weightField('weighedG', { min: 1, max: 100_000 }).transform(grams => Math.round(grams)).optional(),
  checklist: z.array(z.enum(packingChecklistIds, { error: `checklist holds ids of ${packingChecklistIds.join(', ')}` }), { error: 'checklist must be a list of ticked ids' }).max(10, 'checklist is too long'),
})
export type DispatchPackInput = z.output<typeof dispatchPackSchema>

/**
 * The check digit of a UPU S10 item identifier (UPU standard S10): the eight serial digits weighted
 * 8 6 4 2 3 5 9 7 and summed; 11 − (sum mod 11), where 10 becomes 0 and 11 becomes 5.
 */
export function s10CheckDigit(serial: string): number {
  if (!/^\d{8}$/.test(serial)) throw new RangeError(`expected eight digits, got "${serial}"`)
  const weights = [8, 6, 4, 2, 3, 5, 9, 7]
  const sum = [...serial].reduce((total, digit, index) => total + Number(digit) * weights[index]!, 0)
  const check = 11 - (sum % 11)
  return check === 10 ? 0 : check === 11 ? 5 : check
}

const S10_SHAPE = /^[A-Z]{2}(\d{8})(\d)[A-Z]{2}$/

/**
 * A tracking number as the shop keeps it: upper case, no spaces. For the postal carrier (`post`) a number
 * shaped like a UPU S10 identifier (2 letters, 8 digits, a check digit, 2 letters) must carry the right
 * check digit; anything else is 6–40 letters, digits, spaces and hyphens. Returns the number, or why not.
 */
export function normaliseTrackingNumber(carrier: string, raw: string): { ok: true, value: string } | { ok: false, reason: string } {
  const text = raw.trim()
  if (!/^[A-Za-z0-9 -]{6,40}$/.test(text)) return { ok: false, reason: 'a tracking number is 6 to 40 letters, digits, spaces and hyphens' }
  const value = text.replace(/\s+/g, '').toUpperCase()
  if (value.replace(/-/g, '').length < 6) return { ok: false, reason: 'a tracking number has at least 6 letters or digits' }
  const s10 = carrier === 'post' ? S10_SHAPE.exec(value) : null
  if (s10 && s10CheckDigit(s10[1]!) !== Number(s10[2])) {
    return { ok: false, reason: `${value} looks like a postal item number (UPU S10), but its check digit should be ${s10CheckDigit(s10[1]!)}, not ${s10[2]}: check the number` }
  }
  return { ok: true, value }
}

export const dispatchShipSchema = z.object({
  carrier: z.string({ error: 'carrier is required' }).trim().min(1, 'carrier is required').max(60, 'carrier is at most 60 characters'),
  trackingNumber: z.string({ error: 'trackingNumber is required' }).max(60, 'trackingNumber is too long'),
}).transform((input, ctx) => {
  const tracking = normaliseTrackingNumber(input.carrier, input.trackingNumber)
  if (!tracking.ok) {
    ctx.addIssue({ code: 'custom', path: ['trackingNumber'], message: tracking.reason })
    return z.NEVER
  }
  return { carrier: input.carrier, trackingNumber: tracking.value }
})
export type DispatchShipInput = z.output<typeof dispatchShipSchema>

/**
 * Limits of a breakage claim: photos per claim and the length of the description. Written over several
 * lines: the auto-import scan reads a one-line `export const x = { a: 1, b: 2 } as const` as running on
 * into the next export, which then goes missing.
 */
export const claimLimits = {
  photosMin: 1,
  photosMax: 6,
  descriptionMin: 10,
  descriptionMax: 2000,
} as const

export const claimFormSchema = z.object({
  description: z.string({ error: 'description is required: say what arrived broken' }).trim()
    .min(claimLimits.descriptionMin, `description: at least ${claimLimits.descriptionMin} characters, say what arrived broken`)
    .max(claimLimits.descriptionMax, `description is at most ${claimLimits.descriptionMax} characters`),
  itemIds: z.string({ error: 'itemIds must be item ids separated by commas' }).trim().max(400, 'itemIds is too long').optional()
    .transform((text, ctx) => {
      if (!text) return []
      const parts = text.split(',').map(part => part.trim()).filter(Boolean)
      if (parts.some(part => !/^\d{1,9}$/.test(part))) {
        ctx.addIssue({ code: 'custom', message: 'itemIds must be item ids (whole numbers) separated by commas' })
        return z.NEVER
      }
      return [...new Set(parts.map(Number))]
    }),
})
export type ClaimFormInput = z.output<typeof claimFormSchema>

export const claimResolutionSchema = z.object({
  action: z.enum(['replace', 'refund', 'decline'], { error: 'action must be replace, refund or decline' }),
  note: z.string({ error: 'note is required: say what was decided and why' }).trim().min(1, 'note is required: say what was decided and why').max(1000, 'note is at most 1000 characters'),
  amountMinor: z.number({ error: 'amountMinor must be a number of cents' }).int('amountMinor must be whole cents').positive('amountMinor must be more than 0').max(100_000_000, 'amountMinor is too large').optional(),
})
export type ClaimResolutionInput = z.output<typeof claimResolutionSchema>

export const claimStatusFilterSchema = z.object({
  status: z.enum(['open', 'replaced', 'refunded', 'declined', 'all'], { error: 'status must be open, replaced, refunded, declined or all' }).default('all'),
})

/** `{ number }` of an order from a route such as `/api/dispatch/[number]`. */
export const dispatchOrderParamsSchema = z.object({ number: z.string({ error: 'number is required' }).trim().min(1, 'number is required').max(40, 'number is too long') })

/** The signed link a guest reads their order with (`?t=`), as `GET /api/orders/{number}` takes it. */
export const orderLinkQuerySchema = z.object({ t: z.string({ error: 't must be text' }).max(100, 't is too long').optional() })

export const claimPhotoParamsSchema = dispatchOrderParamsSchema.extend({
  id: idField('id'),
  index: z.string({ error: 'index is required' }).regex(/^\d{1,2}$/, 'index must be a photo number from 0').transform(Number),
})
