import { z } from 'zod'
import { customMessagesField } from './customSchemas'
import { countryCodeFor } from './addressPlace'

export const cartItemSchema = z.object({
  slug: z.string({ error: 'slug is required' }).trim().min(1, 'slug is required').max(120, 'slug is too long'),
  qty: z.number({ error: 'qty must be a number' }).int('qty must be a whole number').min(1, 'qty must be at least 1').max(50, 'qty must be at most 50'),
  // The unit price the customer saw when filling the cart; a different price now is reported before paying.
  seenUnitPriceMinor: z.number().int().nonnegative().optional(),
})

export const cartItemsField = z.array(cartItemSchema, { error: 'items must be a list' })
  .min(1, 'items: the cart is empty')
  .max(30, 'items: at most 30 different items in one order')
  .refine(items => new Set(items.map(item => item.slug)).size === items.length, 'items: each product may appear once (use qty)')

/** The cart's lines beside personal messages: an empty list is the same as none (the cart may hold only messages). */
const itemsBesideMessages = z.preprocess(value => (Array.isArray(value) && value.length === 0 ? undefined : value), cartItemsField.optional())
const atLeastOneLine = (body: { items?: unknown[] | undefined, customMessages?: unknown[] | undefined }) => (body.items?.length ?? 0) + (body.customMessages?.length ?? 0) > 0
const emptyCart = { message: 'items: the cart is empty', path: ['items'] }
/** Accepted from older clients and thrown away: the zone and tax region follow from the address. */
const ignoredChoice = z.unknown().transform(() => undefined).optional()
/** A country as a code ("US", "us") or an English name ("United States"), kept as the ISO 3166-1 alpha-2 code. */
export const countryField = z.string({ error: issue => (issue.input === undefined ? 'country is required' : 'country must be text') })
  .trim().min(1, 'country is required').max(60, 'country is too long')
  .transform((value, ctx) => countryCodeFor(value) ?? (ctx.addIssue({ code: 'custom', message: 'country must be one from the list (an ISO 3166-1 code such as US, or its English name)' }), z.NEVER))

export const cartQuoteSchema = z.object({
  items: itemsBesideMessages,
  customMessages: customMessagesField.optional(),
  // Where the parcel goes, as far as the customer has filled it in: it decides the zone and the tax.
  shipTo: z.object({ country: z.string().trim().max(60).optional(), region: z.string().trim().max(80).optional() }).optional(),
  // The zone and tax region are the server's to decide from the address; older clients may still send them.
  zone: ignoredChoice,
  taxRegion: ignoredChoice,
}).refine(atLeastOneLine, emptyCart)

const addressText = (field: string, max = 120) => z.string({ error: issue => (issue.input === undefined ? `${field} is required` : `${field} must be text`) })
  .trim().min(1, `${field} is required`).max(max, `${field} is too long`)

export const shippingAddressSchema = z.object({
  name: addressText('name'),
  line1: addressText('line1'),
  line2: z.string().trim().max(120, 'line2 is too long').optional(),
  city: addressText('city', 80),
  region: z.string().trim().max(80, 'region is too long').optional(),
  postalCode: addressText('postalCode', 20),
  country: countryField,
})

export const checkoutSchema = z.object({
  // Cylinders from the cart, personal messages to order, or both.
  items: itemsBesideMessages,
  customMessages: customMessagesField.optional(),
  email: z.string({ error: 'email is required' }).trim().max(254, 'email is too long').pipe(z.email({ error: 'email is not a valid address' })).transform(v => v.toLowerCase()),
  shippingAddress: shippingAddressSchema,
  zone: ignoredChoice,
  taxRegion: ignoredChoice,
  // After being told of a price change, the customer may accept the new prices and go on.
  acceptChanges: z.boolean().optional(),
  // Made by the browser for one press of "Go to payment" (kept while the cart and form stay the same),
  // so a doubled or retried request finds the order the first one made instead of holding stock twice.
  checkoutKey: z.string({ error: 'checkoutKey must be text' }).regex(/^[A-Za-z0-9_-]{16,80}$/, 'checkoutKey must be 16 to 80 letters, digits, "-" or "_"').optional(),
}).refine(atLeastOneLine, emptyCart)

export type CartItemInput = z.infer<typeof cartItemSchema>
export type CheckoutInput = z.infer<typeof checkoutSchema>

/** An order's life cycle, in the order the database's enum keeps them. */
export const orderStatuses = ['awaiting_payment', 'paid', 'in_production', 'proof_pending', 'ready_to_pack', 'packed', 'shipped', 'delivered', 'cancelled', 'refunded'] as const

export const orderStatusLabels = {
  awaiting_payment: 'Awaiting payment',
  paid: 'Paid',
  in_production: 'Being made',
  proof_pending: 'Proof to approve',
  ready_to_pack: 'Ready to pack',
  packed: 'Packed',
  shipped: 'Shipped',
  delivered: 'Delivered',
  cancelled: 'Cancelled',
  refunded: 'Refunded',
} as const satisfies Record<typeof orderStatuses[number], string>

export type OrderStatus = typeof orderStatuses[number]
