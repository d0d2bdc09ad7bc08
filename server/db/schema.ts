import { sql } from 'drizzle-orm'
import { boolean, check, date, doublePrecision, index, integer, jsonb, pgEnum, pgSequence, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core'
// Each enum's values are defined once, in the shared code the pages and forms use too.
import { userRoles } from '../../shared/types/auth'
import type { SurfaceAnalysis } from '../audio'
import { blankStates } from '../../shared/utils/blankLifecycle'
import { cylinderFormats } from '../../shared/utils/cylinder'
import { orderStatuses } from '../../shared/utils/shopSchemas'
import { ticketStages } from '../../shared/utils/ticketLifecycle'

export const userRole = pgEnum('user_role', userRoles)

export const users = pgTable('users', {
  id: serial('id').primaryKey(),
  email: text('email').notNull(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  role: userRole('role').notNull().default('collector'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  uniqueIndex('users_email_lower_unique').on(sql`lower(${table.email})`),
])

export const settings = pgTable('settings', {
  key: text('key').primaryKey(),
  value: jsonb('value').notNull(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  updatedBy: integer('updated_by').references(() => users.id, { onDelete: 'set null' }),
})

export const mailStatus = pgEnum('mail_status', ['pending', 'sending', 'sent', 'failed'])

export const mailOutbox = pgTable('mail_outbox', {
  id: serial('id').primaryKey(),
  // What caused the message, e.g. `welcome:12`; unique so a retried change cannot queue it twice.
  dedupeKey: text('dedupe_key').unique(),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  htmlBody: text('html_body').notNull(),
  status: mailStatus('status').notNull().default('pending'),
  attempts: integer('attempts').notNull().default(0),
  nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
  lastError: text('last_error'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  sentAt: timestamp('sent_at', { withTimezone: true }),
}, table => [
  index('mail_outbox_due').on(table.status, table.nextAttemptAt),
])

// One row per sign-in that failed, or that is still being checked (`pending`): an attempt is logged
// before its password is checked so that servers sharing this database count it at once.
export const signInFailures = pgTable('sign_in_failures', {
  id: serial('id').primaryKey(),
  email: text('email').notNull(),
  address: text('address').notNull(),
  pending: boolean('pending').notNull().default(false),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('sign_in_failures_email').on(table.email, table.at),
  index('sign_in_failures_address').on(table.address, table.at),
])

// Password-reset requests, for their rate limit (server/utils/account/throttle.ts); any e-mail, account or not.
export const resetRequests = pgTable('reset_requests', {
  id: serial('id').primaryKey(),
  email: text('email').notNull(),
  address: text('address').notNull(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('reset_requests_email').on(table.email, table.at),
  index('reset_requests_address').on(table.address, table.at),
])

// A link works only while it is its user's newest (server/api/auth/reset.post.ts); a password change
// deletes the unused ones.
export const passwordResets = pgTable('password_resets', {
  tokenHash: text('token_hash').primaryKey(),
  userId: integer('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  usedAt: timestamp('used_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('password_resets_user').on(table.userId, table.createdAt),
])

// One row per signed-in browser. The sealed cookie carries the session's random id; only its SHA-256
// is stored, so a copy of the database cannot be turned into cookies. Signing out deletes the row.
export const userSessions = pgTable('user_sessions', {
  idHash: text('id_hash').primaryKey(),
  userId: integer('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  // Moved forward at most once a day while the session is used (server/utils/account/auth.ts).
  lastSeenAt: timestamp('last_seen_at', { withTimezone: true }).notNull().defaultNow(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
}, table => [
  index('user_sessions_user').on(table.userId),
])

export const cylinderFormat = pgEnum('cylinder_format', cylinderFormats)
export const productKind = pgEnum('product_kind', ['blank', 'recorded', 'custom'])

/** Uploaded files (photos, audio samples, surface-test recordings), stored by generated key in Nitro storage. */
export const files = pgTable('files', {
  id: text('id').primaryKey(),
  purpose: text('purpose').notNull(),
  mime: text('mime').notNull(),
  bytes: integer('bytes').notNull(),
  originalName: text('original_name').notNull(),
  // Public files (catalogue photos and samples) are served to anyone; others only to makers.
  isPublic: boolean('is_public').notNull().default(false),
  uploadedBy: integer('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
})

export const products = pgTable('products', {
  id: serial('id').primaryKey(),
  slug: text('slug').notNull().unique(),
  kind: productKind('kind').notNull(),
  title: text('title').notNull(),
  performer: text('performer'),
  description: text('description').notNull().default(''),
  format: cylinderFormat('format').notNull(),
  rpm: integer('rpm').notNull().default(160),
  material: text('material').notNull(),
  condition: text('condition').notNull().default('new'),
  runningTimeS: integer('running_time_s'),
  priceMinor: integer('price_minor').notNull(),
  // Available to sell now; checkout reserves by decrementing it, and the check keeps it from going below zero.
  stock: integer('stock').notNull().default(0),
  editionSize: integer('edition_size'),
  // Recorded cylinders cut for each order need a production ticket; stock blanks only need picking.
  madeToOrder: boolean('made_to_order').notNull().default(false),
  // The wax formula of the shop's list a made cylinder (recorded, custom) or a blank is of.
  waxFormulaId: text('wax_formula_id'),
  // A blank product's stock: `register` counts the register's free, passed blanks of its format and wax
  // (less those promised to open orders not yet packed) and is recomputed whenever the register changes;
  // `manual` keeps the count the maker types. Other kinds ignore it.
  stockSource: text('stock_source', { enum: ['register', 'manual'] }).notNull().default('register'),
  hidden: boolean('hidden').notNull().default(false),
  photoFileIds: jsonb('photo_file_ids').$type<string[]>().notNull().default([]),
  photoAlt: text('photo_alt').notNull().default(''),
  sampleFileId: text('sample_file_id').references(() => files.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  check('products_stock_not_negative', sql`${table.stock} >= 0`),
  check('products_price_not_negative', sql`${table.priceMinor} >= 0`),
  index('products_listing').on(table.hidden, table.kind, table.format),
])

export const productChanges = pgTable('product_changes', {
  id: serial('id').primaryKey(),
  productId: integer('product_id').notNull().references(() => products.id, { onDelete: 'cascade' }),
  userId: integer('user_id').references(() => users.id, { onDelete: 'set null' }),
  field: text('field').notNull(),
  oldValue: text('old_value'),
  newValue: text('new_value'),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
})

export const orderStatus = pgEnum('order_status', orderStatuses)

export interface ShippingAddress {
  name: string
  line1: string
  line2?: string
  city: string
  region?: string
  postalCode: string
  country: string
}

export const orderNumberSequence = pgSequence('order_number_seq', { startWith: 1001 })

export const orders = pgTable('orders', {
  id: serial('id').primaryKey(),
  // e.g. GW26-01001: the year and a sequence number, short enough to read out on the telephone.
  number: text('number').notNull().unique().default(sql`('GW' || to_char(now(), 'YY') || '-' || lpad(nextval('order_number_seq')::text, 5, '0'))`),
  userId: integer('user_id').references(() => users.id, { onDelete: 'set null' }),
  email: text('email').notNull(),
  shippingAddress: jsonb('shipping_address').$type<ShippingAddress>().notNull(),
  zone: text('zone').notNull(),
  taxRegion: text('tax_region').notNull(),
  status: orderStatus('status').notNull().default('awaiting_payment'),
  currency: text('currency').notNull(),
  subtotalMinor: integer('subtotal_minor').notNull(),
  shippingMinor: integer('shipping_minor').notNull(),
  taxMinor: integer('tax_minor').notNull(),
  totalMinor: integer('total_minor').notNull(),
  refundedMinor: integer('refunded_minor').notNull().default(0),
  checkoutSessionId: text('checkout_session_id').unique(),
  // A key the customer's browser makes for one press of "Go to payment": a retried or doubled request
  // with the same key finds this order instead of holding the stock a second time. Cleared when the
  // order is cancelled, so a retry after a failure may check out afresh.
  checkoutKey: text('checkout_key').unique(),
  paymentIntentId: text('payment_intent_id'),
  reservationExpiresAt: timestamp('reservation_expires_at', { withTimezone: true }),
  // Stock of this order's items has been given back (expiry, failure or a restocking refund); set once.
  stockReleasedAt: timestamp('stock_released_at', { withTimezone: true }),
  paidAt: timestamp('paid_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('orders_user').on(table.userId),
  index('orders_status').on(table.status, table.createdAt),
  check('orders_refund_within_total', sql`${table.refundedMinor} >= 0 and ${table.refundedMinor} <= ${table.totalMinor}`),
])

export const orderItems = pgTable('order_items', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  productId: integer('product_id').references(() => products.id, { onDelete: 'set null' }),
  kind: productKind('kind').notNull(),
  title: text('title').notNull(),
  format: cylinderFormat('format').notNull(),
  quantity: integer('quantity').notNull(),
  unitPriceMinor: integer('unit_price_minor').notNull(),
  lineTotalMinor: integer('line_total_minor').notNull(),
  taxMinor: integer('tax_minor').notNull(),
  madeToOrder: boolean('made_to_order').notNull().default(false),
  details: jsonb('details').$type<Record<string, unknown>>(),
}, table => [
  index('order_items_order').on(table.orderId),
  check('order_items_quantity_positive', sql`${table.quantity} > 0`),
])

export const orderEvents = pgTable('order_events', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  fromStatus: orderStatus('from_status'),
  toStatus: orderStatus('to_status').notNull(),
  note: text('note'),
  actorUserId: integer('actor_user_id').references(() => users.id, { onDelete: 'set null' }),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('order_events_order').on(table.orderId, table.at),
])

/** Each payment-service event is handled once: the primary key is the event id. */
export const paymentEvents = pgTable('payment_events', {
  eventId: text('event_id').primaryKey(),
  type: text('type').notNull(),
  orderId: integer('order_id').references(() => orders.id, { onDelete: 'set null' }),
  outcome: text('outcome').notNull(),
  receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
})

export const refunds = pgTable('refunds', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  providerRefundId: text('provider_refund_id').unique(),
  amountMinor: integer('amount_minor').notNull(),
  reason: text('reason').notNull(),
  // Whether this refund puts anything back on sale (the items and counts are in refund_items).
  restock: boolean('restock').notNull().default(false),
  status: text('status').notNull().default('requested'),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  check('refunds_amount_positive', sql`${table.amountMinor} > 0`),
])

/**
 * What one refund puts back on sale, item by item. Written with the refund, applied (stock added) once,
 * when the payment service confirms the refund; a refused refund is deleted and takes these rows with it.
 */
export const refundItems = pgTable('refund_items', {
  id: serial('id').primaryKey(),
  refundId: integer('refund_id').notNull().references(() => refunds.id, { onDelete: 'cascade' }),
  orderItemId: integer('order_item_id').notNull().references(() => orderItems.id, { onDelete: 'cascade' }),
  quantity: integer('quantity').notNull(),
}, table => [
  uniqueIndex('refund_items_refund_item').on(table.refundId, table.orderItemId),
  index('refund_items_order_item').on(table.orderItemId),
  check('refund_items_quantity_positive', sql`${table.quantity} > 0`),
])

// ——— Workshop ———

export const waxBatches = pgTable('wax_batches', {
  id: serial('id').primaryKey(),
  code: text('code').notNull().unique(),
  formula: text('formula').notNull(),
  pourDate: date('pour_date', { mode: 'string' }).notNull(),
  // Feeds the heat-and-fit calculator; per kelvin, volumetric (linear is about a third).
  volumetricExpansionPerK: doublePrecision('volumetric_expansion_per_k').notNull(),
  softeningPointC: doublePrecision('softening_point_c'),
  // The wax formula of the shop's list (Workshop figures → wax formulas) this batch was cast from.
  waxFormulaId: text('wax_formula_id'),
  // The pour as the trade records it.
  meltTempC: doublePrecision('melt_temp_c'),
  pourTempC: doublePrecision('pour_temp_c'),
  mouldTempC: doublePrecision('mould_temp_c'),
  coolingMinutes: integer('cooling_minutes'),
  castCount: integer('cast_count'),
  rejectedAtCasting: integer('rejected_at_casting'),
  notes: text('notes').notNull().default(''),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
})

/** One row per year: blank codes GW-<yy>-<nnnn> are drawn from it under a row lock, without gaps or repeats. */
export const blankCodeCounters = pgTable('blank_code_counters', {
  year: integer('year').primaryKey(),
  last: integer('last').notNull().default(0),
})

export const blankState = pgEnum('blank_state', blankStates)

export const blanks = pgTable('blanks', {
  id: serial('id').primaryKey(),
  code: text('code').notNull().unique(),
  batchId: integer('batch_id').notNull().references(() => waxBatches.id),
  format: cylinderFormat('format').notNull(),
  state: blankState('state').notNull().default('cast'),
  diameterIn: doublePrecision('diameter_in'),
  // Surfaces shaved away so far; the current surface is number surfacesUsed + 1.
  surfacesUsed: integer('surfaces_used').notNull().default(0),
  location: text('location').notNull().default(''),
  notes: text('notes').notNull().default(''),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('blanks_register').on(table.state, table.format, table.batchId),
  index('blanks_batch').on(table.batchId),
])

/**
 * The register blank that goes out as one unit of a blank product, chosen when the order is packed:
 * reserved then, shipped with the order. A blank goes out once (unique), a unit takes one blank.
 */
export const orderItemBlanks = pgTable('order_item_blanks', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  orderItemId: integer('order_item_id').notNull().references(() => orderItems.id, { onDelete: 'cascade' }),
  unit: integer('unit').notNull(),
  blankId: integer('blank_id').notNull().references(() => blanks.id),
  tiedBy: integer('tied_by').references(() => users.id, { onDelete: 'set null' }),
  tiedAt: timestamp('tied_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  uniqueIndex('order_item_blanks_blank').on(table.blankId),
  uniqueIndex('order_item_blanks_item_unit').on(table.orderItemId, table.unit),
  index('order_item_blanks_order').on(table.orderId),
])

export const blankLogKind = pgEnum('blank_log_kind', ['reaming', 'shaving', 'reshave', 'state', 'note'])

export const blankLog = pgTable('blank_log', {
  id: serial('id').primaryKey(),
  blankId: integer('blank_id').notNull().references(() => blanks.id, { onDelete: 'cascade' }),
  kind: blankLogKind('kind').notNull(),
  data: jsonb('data').$type<Record<string, unknown>>().notNull(),
  byUserId: integer('by_user_id').references(() => users.id, { onDelete: 'set null' }),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('blank_log_blank').on(table.blankId, table.at),
])

// `incomplete`: the play-through does not cover enough of the surface to judge it; never a pass.
export const testVerdict = pgEnum('test_verdict', ['pass', 'marginal', 'fail', 'incomplete'])

export const surfaceTests = pgTable('surface_tests', {
  id: serial('id').primaryKey(),
  blankId: integer('blank_id').notNull().references(() => blanks.id, { onDelete: 'cascade' }),
  surface: integer('surface').notNull(),
  fileId: text('file_id').references(() => files.id, { onDelete: 'set null' }),
  rpm: integer('rpm').notNull(),
  // The audio engine's full answer (levels, once-per-turn, clicks, spectrum, envelope).
  figures: jsonb('figures').$type<SurfaceAnalysis>().notNull(),
  aWeightedDbfs: doublePrecision('a_weighted_dbfs').notNull(),
  rotaryDb: doublePrecision('rotary_db').notNull(),
  clicksPerMinute: doublePrecision('clicks_per_minute').notNull(),
  computedVerdict: testVerdict('computed_verdict').notNull(),
  finalVerdict: text('final_verdict', { enum: ['pass', 'fail', 'incomplete'] }).notNull(),
  overruleReason: text('overrule_reason'),
  listeningNotes: text('listening_notes').notNull().default(''),
  testedBy: integer('tested_by').references(() => users.id, { onDelete: 'set null' }),
  testedAt: timestamp('tested_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('surface_tests_blank').on(table.blankId, table.surface, table.testedAt),
])

export const recorders = pgTable('recorders', {
  id: serial('id').primaryKey(),
  name: text('name').notNull().unique(),
  stylus: text('stylus').notNull().default(''),
  horn: text('horn').notNull().default(''),
  spacer: text('spacer').notNull().default(''),
  conditionNotes: text('condition_notes').notNull().default(''),
  inService: boolean('in_service').notNull().default(true),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
})

export const testCuts = pgTable('test_cuts', {
  id: serial('id').primaryKey(),
  recorderId: integer('recorder_id').notNull().references(() => recorders.id, { onDelete: 'cascade' }),
  blankId: integer('blank_id').references(() => blanks.id, { onDelete: 'set null' }),
  fileId: text('file_id').references(() => files.id, { onDelete: 'set null' }),
  figures: jsonb('figures').$type<SurfaceAnalysis>().notNull(),
  aWeightedDbfs: doublePrecision('a_weighted_dbfs').notNull(),
  clicksPerMinute: doublePrecision('clicks_per_minute').notNull(),
  verdict: testVerdict('verdict').notNull(),
  notes: text('notes').notNull().default(''),
  byUserId: integer('by_user_id').references(() => users.id, { onDelete: 'set null' }),
  cutAt: timestamp('cut_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('test_cuts_recorder').on(table.recorderId, table.cutAt),
])

export const ticketStage = pgEnum('ticket_stage', ticketStages)

export const tickets = pgTable('tickets', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  orderItemId: integer('order_item_id').notNull().references(() => orderItems.id, { onDelete: 'cascade' }),
  // One ticket per cylinder to make: an item of quantity 3 has units 1, 2 and 3.
  unit: integer('unit').notNull(),
  stage: ticketStage('stage').notNull().default('queued'),
  format: cylinderFormat('format').notNull(),
  blankId: integer('blank_id').references(() => blanks.id),
  recorderId: integer('recorder_id').references(() => recorders.id),
  dueDate: date('due_date', { mode: 'string' }),
  wishes: text('wishes').notNull().default(''),
  cutAt: timestamp('cut_at', { withTimezone: true }),
  cutTestId: integer('cut_test_id').references(() => testCuts.id, { onDelete: 'set null' }),
  // Re-cuts asked for by the customer (free ones first, then paid), counted for the shop's limit.
  recuts: integer('recuts').notNull().default(0),
  // Why the maker gave this ticket a blank of another wax or format than the item's (shown on the certificate).
  blankOverrideReason: text('blank_override_reason'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  uniqueIndex('tickets_item_unit').on(table.orderItemId, table.unit),
  // The database itself keeps two open tickets from holding one blank, however fast two makers click.
  uniqueIndex('tickets_open_blank').on(table.blankId).where(sql`${table.blankId} is not null and ${table.stage} <> 'done'`),
  index('tickets_board').on(table.stage, table.dueDate),
])

export const ticketEvents = pgTable('ticket_events', {
  id: serial('id').primaryKey(),
  ticketId: integer('ticket_id').notNull().references(() => tickets.id, { onDelete: 'cascade' }),
  fromStage: ticketStage('from_stage'),
  toStage: ticketStage('to_stage').notNull(),
  note: text('note'),
  actorUserId: integer('actor_user_id').references(() => users.id, { onDelete: 'set null' }),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('ticket_events_ticket').on(table.ticketId, table.at),
])

// ---- Personal messages (custom): the customer's wishes for a message cut to order, and its proofs ----

export const messageVoice = pgEnum('message_voice', ['maker', 'upload'])

/** One personal message ordered: the wishes behind an order item of kind `custom` (one per item). */
export const customMessages = pgTable('custom_messages', {
  id: serial('id').primaryKey(),
  orderItemId: integer('order_item_id').notNull().unique().references(() => orderItems.id, { onDelete: 'cascade' }),
  occasion: text('occasion').notNull(),
  recipientName: text('recipient_name').notNull(),
  script: text('script').notNull().default(''),
  voice: messageVoice('voice').notNull(),
  // The customer's own recording for the maker to play into the horn (voice = upload).
  voiceFileId: text('voice_file_id').references(() => files.id, { onDelete: 'set null' }),
  voiceSeconds: doublePrecision('voice_seconds'),
  rpm: integer('rpm').notNull(),
  rush: boolean('rush').notNull().default(false),
  wishedDate: date('wished_date', { mode: 'string' }).notNull(),
  notes: text('notes').notNull().default(''),
  // The quote the customer saw and paid: fit (words, seconds, verdict) and price parts in minor units.
  quote: jsonb('quote').$type<Record<string, unknown>>().notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
})

export const proofAnswer = pgEnum('proof_answer', ['waiting', 'approved', 'recut'])

/** A transfer of a message's cut sent to the customer to hear; answered once (approve or ask for a re-cut). */
export const proofs = pgTable('proofs', {
  id: serial('id').primaryKey(),
  ticketId: integer('ticket_id').notNull().references(() => tickets.id, { onDelete: 'cascade' }),
  fileId: text('file_id').references(() => files.id, { onDelete: 'set null' }),
  note: text('note').notNull().default(''),
  answer: proofAnswer('answer').notNull().default('waiting'),
  answerNote: text('answer_note').notNull().default(''),
  // `customer`, or `maker` when the maker answered for the customer (with the reason in answer_note).
  answeredVia: text('answered_via', { enum: ['customer', 'maker'] }),
  answeredBy: integer('answered_by').references(() => users.id, { onDelete: 'set null' }),
  answeredAt: timestamp('answered_at', { withTimezone: true }),
  // A re-cut past the shop's free ones, paid for.
  paidRecut: boolean('paid_recut').notNull().default(false),
  reminderSentAt: timestamp('reminder_sent_at', { withTimezone: true }),
  uploadedBy: integer('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('proofs_ticket').on(table.ticketId, table.createdAt),
  // At most one proof waiting for an answer per ticket.
  uniqueIndex('proofs_one_waiting').on(table.ticketId).where(sql`${table.answer} = 'waiting'`),
])

// ---- Dispatch: heat checks, packing and shipping, breakage claims ----

export const heatVerdict = pgEnum('heat_verdict', ['ok', 'caution', 'hold'])

/** Each heat check of an order before it ships; the newest one decides whether the order is held. */
export const heatChecks = pgTable('heat_checks', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  forecastHigh: doublePrecision('forecast_high').notNull(),
  unit: text('unit', { enum: ['C', 'F'] }).notNull(),
  forecastHighC: doublePrecision('forecast_high_c').notNull(),
  transitDays: integer('transit_days').notNull(),
  verdict: heatVerdict('verdict').notNull(),
  reasons: jsonb('reasons').$type<string[]>().notNull(),
  nextShipDate: date('next_ship_date', { mode: 'string' }).notNull(),
  checkedBy: integer('checked_by').references(() => users.id, { onDelete: 'set null' }),
  checkedAt: timestamp('checked_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('heat_checks_order').on(table.orderId, table.checkedAt),
])

/** How an order was packed, shipped and delivered (one row per order, filled in as it goes). */
export const shipments = pgTable('shipments', {
  orderId: integer('order_id').primaryKey().references(() => orders.id, { onDelete: 'cascade' }),
  // The engine's packing for the box chosen: tube, boxes, outside size, actual/dimensional/billable weight.
  packing: jsonb('packing').$type<Record<string, unknown>>(),
  weighedG: integer('weighed_g'),
  checklist: jsonb('checklist').$type<string[]>().notNull().default([]),
  packedBy: integer('packed_by').references(() => users.id, { onDelete: 'set null' }),
  packedAt: timestamp('packed_at', { withTimezone: true }),
  carrier: text('carrier'),
  trackingNumber: text('tracking_number'),
  shippedBy: integer('shipped_by').references(() => users.id, { onDelete: 'set null' }),
  shippedAt: timestamp('shipped_at', { withTimezone: true }),
  deliveredAt: timestamp('delivered_at', { withTimezone: true }),
  // `shipper` or `customer`: who said it arrived.
  deliveredVia: text('delivered_via', { enum: ['shipper', 'customer'] }),
}, table => [
  index('shipments_tracking').on(table.trackingNumber),
])

export const claimStatus = pgEnum('claim_status', ['open', 'replaced', 'refunded', 'declined'])

/** A customer's report of a cylinder that arrived broken, with photos, and the maker's answer. */
export const claims = pgTable('claims', {
  id: serial('id').primaryKey(),
  orderId: integer('order_id').notNull().references(() => orders.id, { onDelete: 'cascade' }),
  userId: integer('user_id').references(() => users.id, { onDelete: 'set null' }),
  description: text('description').notNull(),
  // Order item ids reported broken (all items when the customer does not say).
  itemIds: jsonb('item_ids').$type<number[]>().notNull().default([]),
  photoFileIds: jsonb('photo_file_ids').$type<string[]>().notNull().default([]),
  status: claimStatus('status').notNull().default('open'),
  resolutionNote: text('resolution_note').notNull().default(''),
  amountMinor: integer('amount_minor'),
  refundId: integer('refund_id').references(() => refunds.id, { onDelete: 'set null' }),
  resolvedBy: integer('resolved_by').references(() => users.id, { onDelete: 'set null' }),
  resolvedAt: timestamp('resolved_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('claims_order').on(table.orderId),
  index('claims_status').on(table.status, table.createdAt),
])
