// The invented demo workshop's recorders, their test-cut histories, a few collectors with orders in
// every state, and production tickets in every stage on tested blanks from the register. Every
// recording is made here by the WAV generator (tone-free noise at a known level with a once-per-turn
// swell and clicks), so the analysis has known right answers. Run after the catalogue and the blank
// register's seed; idempotent.
import { eq, inArray } from 'drizzle-orm'
import { analyseSurfaceWav, makeSurfaceWav } from '../audio'
import { blanks, customMessages, files, orderEvents, orderItems, orders, products, recorders, refunds, testCuts, ticketEvents, tickets, users, waxBatches } from '../db/schema'
import type { BlankRow, OrderRow, ProductRow } from '#shared/types/rows'
import type { EngineSettings } from '#shared/utils/engineSettings'
import { hashPassword } from '#imports'
import { productSlugFrom } from '#shared/utils/catalogueSchemas'
import { demoAccounts } from '#shared/utils/demoAccounts'
import { addDaysToDate, quoteCustomMessage, shopToday } from '#shared/utils/messageQuote'
import type { Database, Transaction } from '../utils/platform/db'
import { uploadStorage } from '../utils/platform/uploads'
import { moveBlank } from '../utils/workshop/blanks'
import { getSetting } from '../utils/workshop/settings'
import { eligibleBlanks, latestCurrentSurfaceTest, ticketDueDate, ticketWishesFromDetails } from '../utils/workshop/tickets'
import { shopWaxFormulas } from '../utils/workshop/waxFormulas'

type OrderStatusValue = OrderRow['status']
type TicketStageValue = typeof tickets.$inferSelect['stage']

const DAY = 86_400_000
const CUT_SECONDS = 5
const CUT_SAMPLE_RATE = 22_050

interface DemoRecorder {
  name: string
  stylus: string
  horn: string
  spacer: string
  conditionNotes: string
  inService: boolean
  /** The sound of its cuts: level (dBFS) at the oldest and newest cut, swell per turn, clicks per cut. */
  sound: { fromDbfs: number, toDbfs: number, colour: 'white' | 'soft', swellDepth: number, clicks: [number, number] }
  /** Days ago of each test cut, oldest first. */
  cutDaysAgo: number[]
}

const demoRecorders: DemoRecorder[] = [
  {
    name: 'Old Brass',
    stylus: 'Sapphire, 0.004 in, round-bottomed',
    horn: 'Brass, 32 in long, 11 in bell — the widest in the shop',
    spacer: 'Leather collar, 1/8 in',
    conditionNotes: 'Loud and full for brass bands, but the wide horn picks up bench rumble: noisy in the bass. Keep the window shut when it cuts.',
    inService: true,
    sound: { fromDbfs: -50, toDbfs: -49, colour: 'soft', swellDepth: 0.03, clicks: [0, 0] },
    cutDaysAgo: [118, 84, 61, 40, 22, 9],
  },
  {
    name: 'Kestrel',
    stylus: 'Sapphire, 0.003 in, freshly lapped',
    horn: 'Spun aluminium, 24 in, narrow bell',
    spacer: 'Cork, 1/16 in',
    conditionNotes: 'The quietest cutter we have; thin on low voices. First choice for spoken messages.',
    inService: true,
    sound: { fromDbfs: -57, toDbfs: -56, colour: 'white', swellDepth: 0.02, clicks: [0, 0] },
    cutDaysAgo: [75, 52, 33, 20, 11, 4],
  },
  {
    name: 'Marrowby',
    stylus: 'Sapphire, 0.004 in, due for lapping',
    horn: 'Brass, 26 in, medium bell',
    spacer: 'Felt, 1/8 in',
    conditionNotes: 'Rebuilt from two incomplete machines. The stylus is wearing: clicks have crept up since spring.',
    inService: true,
    sound: { fromDbfs: -54, toDbfs: -52, colour: 'white', swellDepth: 0.03, clicks: [0, 2] },
    cutDaysAgo: [95, 70, 48, 30, 14, 6],
  },
  {
    name: 'Hollin No. 2',
    stylus: 'Sapphire, 0.003 in',
    horn: 'Tinplate, 28 in, japanned black',
    spacer: 'Brass washer and felt, 3/32 in',
    conditionNotes: 'A worn feed screw gives a slight swell once per turn; otherwise steady. New screw on order.',
    inService: true,
    sound: { fromDbfs: -53, toDbfs: -53, colour: 'white', swellDepth: 0.06, clicks: [0, 0] },
    cutDaysAgo: [88, 57, 36, 18, 7],
  },
  {
    name: 'Grey Heron',
    stylus: 'Sapphire, 0.004 in, chipped',
    horn: 'Copper, 30 in',
    spacer: 'Cork, 1/8 in',
    conditionNotes: 'Out of service: the diaphragm cracked in the cold snap and the last cuts were noisy. Waiting for a new mica diaphragm.',
    inService: false,
    sound: { fromDbfs: -51, toDbfs: -44, colour: 'white', swellDepth: 0.1, clicks: [1, 4] },
    cutDaysAgo: [110, 80, 55, 42],
  },
]

/** Invented collectors; the demo collector account is used too when it exists. */
const demoCollectors = [
  { name: 'Hollis Wrenfield', email: 'hollis.wrenfield@collectors.test', address: { line1: '3 Tallow Row', city: 'Carrowdene', postalCode: 'CD4 7RW', region: 'OR', country: 'US' } },
  { name: 'Maud Pellingham', email: 'maud.pellingham@collectors.test', address: { line1: '17 Ferrow Quay', city: 'Wrenhaven', postalCode: 'WH1 2FQ', region: 'OR', country: 'US' } },
  { name: 'Osric Dunmore', email: 'osric.dunmore@collectors.test', address: { line1: 'The Old Chandlery, Gannet Row', city: 'Lowmere', postalCode: 'LM9 3GR', region: 'OR', country: 'US' } },
]

const demoCutFileId = (recorder: string, index: number) => `demo-testcut-${productSlugFrom(recorder)}-${index + 1}`

function testCutWav(recorder: DemoRecorder, index: number, count: number, seed: number): Uint8Array {
  const share = count > 1 ? index / (count - 1) : 0
  const { sound } = recorder
  return makeSurfaceWav({
    seconds: CUT_SECONDS,
    sampleRate: CUT_SAMPLE_RATE,
    // A few tenths of a decibel from cut to cut, as a real bench gives.
    levelDbfs: sound.fromDbfs + (sound.toDbfs - sound.fromDbfs) * share + (((index * 7) % 5) - 2) * 0.2,
    colour: sound.colour,
    swellDepth: sound.swellDepth,
    clicks: Math.round(sound.clicks[0] + (sound.clicks[1] - sound.clicks[0]) * share),
    seed,
  })
}

/** Five recorders, each with its test cuts; only recorders not there yet (by name) get a history. */
async function seedDemoRecorders(db: Database, now: number) {
  const thresholds = await getSetting('surface', db)
  const storage = await uploadStorage()
  let made = 0
  for (const [recorderIndex, recorder] of demoRecorders.entries()) {
    const { sound: _sound, cutDaysAgo, ...fields } = recorder
    const [inserted] = await db.insert(recorders).values({ ...fields, createdAt: new Date(now - (cutDaysAgo[0]! + 5) * DAY) })
      .onConflictDoNothing({ target: recorders.name }).returning({ id: recorders.id })
    if (!inserted) continue
    const cuts = cutDaysAgo.map((daysAgo, index) => {
      const bytes = testCutWav(recorder, index, cutDaysAgo.length, 1000 + recorderIndex * 50 + index)
      return { bytes, daysAgo, id: demoCutFileId(recorder.name, index), analysis: analyseSurfaceWav(bytes, { rpm: 160, thresholds }) }
    })
    await Promise.all(cuts.map(cut => storage.setItemRaw(cut.id, cut.bytes)))
    await db.transaction(async (tx) => {
      await tx.insert(files).values(cuts.map(cut => ({ id: cut.id, purpose: 'test_cut', mime: 'audio/wav', bytes: cut.bytes.byteLength, originalName: `${cut.id}.wav`, isPublic: false })))
        .onConflictDoNothing()
      await tx.insert(testCuts).values(cuts.map(cut => ({
        recorderId: inserted.id,
        fileId: cut.id,
        figures: cut.analysis,
        aWeightedDbfs: cut.analysis.aWeightedDbfs,
        clicksPerMinute: cut.analysis.clicksPerMinute,
        verdict: cut.analysis.verdict,
        notes: `Silent-groove test cut, ${CUT_SECONDS} s at 160 rpm (demo recording).`,
        cutAt: new Date(now - cut.daysAgo * DAY + 10 * 3600_000),
      })))
    })
    made += cuts.length
  }
  return made
}

/** A personal message ordered through the shop: its wishes are kept as a message row (wished for `wishedInDays` from now). */
interface DemoMessage { occasion: string, recipientName: string, script: string, wishedInDays: number, notes: string }
interface DemoLine { slug?: string, custom?: { format: 'two_minute' | 'four_minute', details: Record<string, unknown>, message?: DemoMessage }, qty: number }
interface DemoOrder {
  collector: number
  status: OrderStatusValue
  placedDaysAgo: number
  lines: DemoLine[]
  /** The stage of each ticket, in item and unit order. */
  stages?: TicketStageValue[]
}

const customMessage = (format: 'two_minute' | 'four_minute', details: Record<string, unknown>): DemoLine => ({ custom: { format, details }, qty: 1 })

/** Orders in every state; made-to-order items carry tickets at the stages listed. Collector 3 is the demo collector. */
const demoOrders: DemoOrder[] = [
  { collector: 0, status: 'awaiting_payment', placedDaysAgo: 0, lines: [{ slug: 'plain-blank-2-minute-stearic-acid', qty: 2 }] },
  { collector: 1, status: 'paid', placedDaysAgo: 1, lines: [{ slug: 'tallow-yard-two-step', qty: 1 }, { slug: 'plain-blank-4-minute-paraffin', qty: 1 }] },
  { collector: 2, status: 'in_production', placedDaysAgo: 12, lines: [{ slug: 'moth-and-mandrel-waltz', qty: 2 }], stages: ['queued', 'blank_assigned'] },
  { collector: 3, status: 'in_production', placedDaysAgo: 6, lines: [{ slug: 'copperkettle-polka', qty: 1 }], stages: ['cut'] },
  {
    collector: 0, status: 'proof_pending', placedDaysAgo: 9, stages: ['proof_sent'],
    lines: [customMessage('two_minute', { occasion: 'Golden wedding', wishedDate: 'a week before the party', script: 'Fifty years ago today, in the rain at Carrowdene, you said yes…' })],
  },
  {
    collector: 1, status: 'in_production', placedDaysAgo: 8, stages: ['approved'],
    lines: [customMessage('four_minute', { occasion: 'Birthday', recipient: 'Grandfather Pellingham', script: 'Happy ninetieth from all of us in Wrenhaven.' })],
  },
  {
    collector: 2, status: 'in_production', placedDaysAgo: 4, stages: ['blank_assigned'],
    lines: [customMessage('two_minute', { occasion: 'Shop opening', dedication: 'For the new tobacconist on Ferrow Quay', script: 'Welcome to the quay — may the smoke always rise straight.' })],
  },
  {
    // A message waiting for its proof: the cue sheet and the proof upload can be tried on its ticket.
    collector: 3, status: 'in_production', placedDaysAgo: 3, stages: ['cut'],
    lines: [{
      qty: 1,
      custom: {
        format: 'two_minute',
        details: {},
        message: {
          occasion: 'Retirement', recipientName: 'Aunt Clemency Wardle', wishedInDays: 16, notes: 'She taught at the Lowmere school for forty years; say "Miss Wardle" the way her pupils did.',
          script: 'Dear Miss Wardle, forty years of chalk dust, spelling tests and patience! From every pupil who ever sat in the front row at Lowmere: thank you. You taught us our letters, our tables, and how to say sorry and mean it. You kept a jar of barley sugar for hard days and never once told us which days were hard. Enjoy your garden at last, and know that the whole town is listening to this record with you.',
        },
      },
    }],
  },
  { collector: 2, status: 'ready_to_pack', placedDaysAgo: 14, lines: [{ slug: 'ballad-of-the-shaving-knife', qty: 1 }], stages: ['to_dispatch'] },
  { collector: 3, status: 'packed', placedDaysAgo: 16, lines: [{ slug: 'copperkettle-polka', qty: 1 }, { slug: 'slow-air-for-a-warm-workshop', qty: 1 }], stages: ['to_dispatch'] },
  { collector: 3, status: 'shipped', placedDaysAgo: 13, lines: [{ slug: 'moth-and-mandrel-waltz', qty: 1 }], stages: ['done'] },
  { collector: 0, status: 'delivered', placedDaysAgo: 40, lines: [{ slug: 'ballad-of-the-shaving-knife', qty: 1 }], stages: ['done'] },
  { collector: 1, status: 'cancelled', placedDaysAgo: 5, lines: [{ slug: 'lanternlight-on-the-ferrow', qty: 1 }] },
  { collector: 2, status: 'refunded', placedDaysAgo: 20, lines: [{ slug: 'orchard-steps-march', qty: 1 }] },
]

/** The states an order passes through to reach `status`, from awaiting payment. */
function orderPath(status: OrderStatusValue, hasProof: boolean): OrderStatusValue[] {
  if (status === 'cancelled') return ['awaiting_payment', 'cancelled']
  if (status === 'refunded') return ['awaiting_payment', 'paid', 'refunded']
  const forward: OrderStatusValue[] = ['awaiting_payment', 'paid', 'in_production', ...(hasProof ? ['proof_pending' as const] : []), 'ready_to_pack', 'packed', 'shipped', 'delivered']
  return forward.slice(0, forward.indexOf(status) + 1)
}

/** The stages a ticket passes through to reach `stage`. */
function ticketPath(stage: TicketStageValue, custom: boolean): TicketStageValue[] {
  const forward: TicketStageValue[] = custom
    ? ['queued', 'blank_assigned', 'cut', 'proof_sent', 'approved', 'to_dispatch', 'done']
    : ['queued', 'blank_assigned', 'cut', 'to_dispatch', 'done']
  return forward.slice(0, forward.indexOf(stage) + 1)
}

/** The blank's state once its ticket is at `stage`. */
const blankStateAt = (stage: TicketStageValue) => stage === 'blank_assigned' ? 'reserved' as const : stage === 'done' ? 'shipped' as const : 'cut' as const

/**
 * Seeds the demo's recorders with their test cuts, then (once) the demo collectors' orders and
 * their tickets. Tickets take tested blanks that a real assignment could take; when the register
 * has none of a format, those tickets stay queued and their orders in production.
 */
export async function seedDemoTickets(db: Database) {
  const started = performance.now()
  const now = Date.now()
  const cutsMade = await seedDemoRecorders(db, now)
  const [already] = await db.select({ id: users.id }).from(users).where(eq(users.email, demoCollectors[0]!.email))
  if (already) return
  const slugs = [...new Set(demoOrders.flatMap(order => order.lines.map(line => line.slug).filter((s): s is string => !!s)))]
  const catalogue = await db.select().from(products).where(inArray(products.slug, slugs))
  if (catalogue.length < slugs.length) {
    console.info('[seed] demo tickets: the demo catalogue is missing, so no demo orders were made')
    return
  }
  const productBySlug = new Map(catalogue.map(product => [product.slug, product]))
  const engine = await getSetting('engine', db)
  const hashes = await Promise.all(demoCollectors.map(collector => hashPassword(`${collector.email}:${now}:${Math.random()}`)))
  const inService = (await db.select().from(recorders).where(eq(recorders.inService, true))).map(row => row.id)
  const makerId = (await db.select({ id: users.id }).from(users).where(eq(users.role, 'maker')).limit(1))[0]?.id ?? null
  const demoCollector = demoAccounts.find(account => account.role === 'collector')!
  const [demoCollectorRow] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, demoCollector.email))

  const summary = await db.transaction(async (tx) => {
    const owners = []
    for (const [index, collector] of demoCollectors.entries()) {
      await tx.insert(users).values({ email: collector.email, name: collector.name, role: 'collector', passwordHash: hashes[index]!, createdAt: new Date(now - 60 * DAY) })
        .onConflictDoNothing()
      const [row] = await tx.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, collector.email))
      owners.push({ ...row!, address: collector.address })
    }
    owners.push(demoCollectorRow
      ? { ...demoCollectorRow, address: { line1: '8 Quill Lane', city: 'Lowmere', postalCode: 'LM2 4AB', region: 'OR', country: 'US' } }
      : owners[0]!)
    const pickBlank = await demoBlankPicker(tx)
    let ticketCount = 0
    for (const [orderIndex, demo] of demoOrders.entries()) {
      ticketCount += await seedDemoOrder(tx, { demo, orderIndex, owner: owners[demo.collector]!, productBySlug, engine, pickBlank, inService, makerId, now })
    }
    return { orders: demoOrders.length, tickets: ticketCount }
  })
  console.info(`[seed] demo tickets: 5 recorders (${cutsMade} test cuts), ${summary.orders} orders, ${summary.tickets} tickets in ${((performance.now() - started) / 1000).toFixed(1)} s`)
}

interface DemoBlankChoice { id: number, code: string, state: BlankRow['state'] }

/**
 * Chooses the blank for a demo ticket: first a blank the register's seed left reserved or cut for a
 * ticket (of the format, held by none, its current surface passed), so the two seeds tell one story;
 * else a tested blank that a real assignment could take.
 */
async function demoBlankPicker(tx: Transaction) {
  const held = new Set((await tx.select({ blankId: tickets.blankId }).from(tickets)).map(row => row.blankId))
  const waiting: (DemoBlankChoice & { format: string })[] = []
  // The demo's made cylinders are all of the shop's first wax (the recordings' and the messages' formula).
  const { defaultId: waxFormulaId } = await shopWaxFormulas(tx)
  const rows = await tx.select({ blank: blanks, formula: waxBatches.waxFormulaId }).from(blanks).innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId))
    .where(inArray(blanks.state, ['reserved', 'cut'])).orderBy(blanks.code)
  for (const { blank, formula } of rows) {
    if ((formula ?? waxFormulaId) === waxFormulaId && !held.has(blank.id) && (await latestCurrentSurfaceTest(tx, blank))?.finalVerdict === 'pass') waiting.push(blank)
  }
  const spare = { two_minute: await eligibleBlanks(tx, 'two_minute', { limit: 40, waxFormulaId }), four_minute: await eligibleBlanks(tx, 'four_minute', { limit: 40, waxFormulaId }) }
  return (format: 'two_minute' | 'four_minute', stage: TicketStageValue): DemoBlankChoice | null => {
    const wanted = blankStateAt(stage)
    const index = waiting.findIndex(blank => blank.format === format && blank.state === wanted)
    if (index >= 0) return waiting.splice(index, 1)[0]!
    const fresh = spare[format].shift()
    return fresh ? { id: fresh.id, code: fresh.code, state: 'tested_pass' } : null
  }
}

interface OrderContext {
  demo: DemoOrder
  orderIndex: number
  owner: { id: number, name: string, email: string, address: { line1: string, city: string, postalCode: string, country: string } }
  productBySlug: Map<string, ProductRow>
  engine: EngineSettings
  pickBlank: (format: 'two_minute' | 'four_minute', stage: TicketStageValue) => DemoBlankChoice | null
  inService: number[]
  makerId: number | null
  now: number
}

async function seedDemoOrder(tx: Transaction, context: OrderContext): Promise<number> {
  const { demo, owner, engine, now, makerId } = context
  const lines = demo.lines.map((line) => {
    if (line.custom?.message) {
      const { message } = line.custom
      const quote = quoteCustomMessage({ script: message.script, format: line.custom.format, voice: 'maker', rush: false }, shopToday(new Date(now - demo.placedDaysAgo * DAY)), engine)
      const details = { occasion: message.occasion, recipient: message.recipientName, wishedDate: addDaysToDate(shopToday(new Date(now)), message.wishedInDays), script: message.script, note: message.notes }
      return { productId: null, kind: 'custom' as const, title: `Personal message — ${message.occasion} for ${message.recipientName}`, format: line.custom.format, quantity: 1, unitPriceMinor: quote.price.totalMinor, madeToOrder: true, details, message: { ...message, quote, wishedDate: details.wishedDate } }
    }
    if (line.custom) {
      const price = engine.prices.customMessage.baseMinor + (line.custom.format === 'four_minute' ? engine.prices.customMessage.fourMinuteSurchargeMinor : 0)
      return { productId: null, kind: 'custom' as const, title: `Personal message: ${String(line.custom.details.occasion ?? 'message')}`, format: line.custom.format, quantity: 1, unitPriceMinor: price, madeToOrder: true, details: line.custom.details }
    }
    const product = context.productBySlug.get(line.slug!)!
    return { productId: product.id, kind: product.kind, title: product.title, format: product.format, quantity: line.qty, unitPriceMinor: product.priceMinor, madeToOrder: product.madeToOrder, details: null }
  })
  const subtotal = lines.reduce((sum, line) => sum + line.unitPriceMinor * line.quantity, 0)
  const shipping = engine.prices.shippingZones.find(zone => zone.id === 'domestic')?.firstParcelMinor ?? 0
  const placedAt = now - demo.placedDaysAgo * DAY - 3 * 3600_000
  const path = orderPath(demo.status, lines.some(line => line.kind === 'custom'))
  const stepAt = (index: number) => new Date(Math.min(now - 60_000, placedAt + (index === 0 ? 0 : 20 * 60_000 + (index - 1) * 2 * DAY)))
  const paidIndex = path.indexOf('paid')
  const total = subtotal + shipping

  // Tickets first as a plan, so an order whose tickets find no blank can stay in production.
  const plans = lines.flatMap((line, lineIndex) => line.madeToOrder
    ? Array.from({ length: line.quantity }, (_, unit) => ({ lineIndex, unit: unit + 1, format: line.format, custom: line.kind === 'custom' }))
    : [])
  const stages = plans.map((plan, index) => {
    const wanted = demo.stages?.[index] ?? 'queued'
    if (wanted === 'queued') return { ...plan, stage: wanted, blank: null }
    const blank = context.pickBlank(plan.format, wanted)
    return { ...plan, stage: blank ? wanted : 'queued' as const, blank }
  })
  const degraded = stages.some((ticket, index) => ticket.stage !== (demo.stages?.[index] ?? 'queued'))
  const status: OrderStatusValue = degraded ? 'in_production' : demo.status
  const finalPath = degraded ? path.slice(0, path.indexOf('in_production') + 1) : path

  const [order] = await tx.insert(orders).values({
    userId: owner.id,
    email: owner.email,
    shippingAddress: { name: owner.name, ...owner.address },
    zone: 'domestic',
    taxRegion: 'no_tax',
    status,
    currency: engine.prices.currency,
    subtotalMinor: subtotal,
    shippingMinor: shipping,
    taxMinor: 0,
    totalMinor: total,
    refundedMinor: status === 'refunded' ? total : 0,
    reservationExpiresAt: status === 'awaiting_payment' ? new Date(now + 25 * 60_000) : new Date(placedAt + 30 * 60_000),
    stockReleasedAt: status === 'cancelled' ? stepAt(1) : null,
    paidAt: paidIndex >= 0 && paidIndex < finalPath.length ? stepAt(paidIndex) : null,
    createdAt: new Date(placedAt),
    updatedAt: stepAt(finalPath.length - 1),
  }).returning()
  const items = await tx.insert(orderItems).values(lines.map(line => ({
    orderId: order!.id, productId: line.productId, kind: line.kind, title: line.title, format: line.format, quantity: line.quantity,
    unitPriceMinor: line.unitPriceMinor, lineTotalMinor: line.unitPriceMinor * line.quantity, taxMinor: 0, madeToOrder: line.madeToOrder, details: line.details,
  }))).returning()
  for (const [index, line] of lines.entries()) {
    if (!('message' in line) || !line.message) continue
    const { message } = line
    await tx.insert(customMessages).values({
      orderItemId: items[index]!.id, occasion: message.occasion, recipientName: message.recipientName, script: message.script, voice: 'maker',
      rpm: engine.standardRpm, rush: false, wishedDate: message.wishedDate, notes: message.notes,
      quote: { fit: message.quote.fit, spokenSeconds: message.quote.spokenSeconds, price: message.quote.price, earliestDate: message.quote.earliestDate },
    }).onConflictDoNothing()
  }
  await tx.insert(orderEvents).values(finalPath.map((state, index) => ({
    orderId: order!.id, fromStatus: index === 0 ? null : finalPath[index - 1]!, toStatus: state, at: stepAt(index),
    note: state === 'cancelled' ? 'The payment page expired unpaid.' : state === 'refunded' ? 'Refunded in full.' : null,
    actorUserId: ['packed', 'ready_to_pack'].includes(state) ? makerId : null,
  })))
  if (status === 'refunded') {
    await tx.insert(refunds).values({ orderId: order!.id, amountMinor: total, reason: 'The customer changed their mind before dispatch.', status: 'succeeded', restock: true, createdBy: makerId, createdAt: stepAt(2) })
  }

  const paidAt = order!.paidAt ?? new Date(placedAt)
  for (const [index, plan] of stages.entries()) {
    const line = lines[plan.lineIndex]!
    const stagePath = ticketPath(plan.stage, plan.custom)
    // A ticket is done when its order ships, never before.
    const shippedAt = finalPath.includes('shipped') ? stepAt(finalPath.indexOf('shipped')) : null
    const at = (step: number) => stagePath[step] === 'done' && shippedAt ? shippedAt : new Date(Math.min(now - 30_000, paidAt.getTime() + step * DAY + 3600_000))
    const cut = stagePath.includes('cut')
    const recorderId = cut ? context.inService[(context.orderIndex + index) % context.inService.length] ?? null : null
    const [ticket] = await tx.insert(tickets).values({
      orderId: order!.id, orderItemId: items[plan.lineIndex]!.id, unit: plan.unit, stage: plan.stage, format: plan.format,
      blankId: plan.blank?.id ?? null, recorderId, dueDate: ticketDueDate(paidAt), wishes: ticketWishesFromDetails(line.details),
      cutAt: cut && recorderId ? at(stagePath.indexOf('cut')) : null, createdAt: paidAt, updatedAt: at(stagePath.length - 1),
    }).returning()
    await tx.insert(ticketEvents).values(stagePath.map((stage, step) => ({
      ticketId: ticket!.id, fromStage: step === 0 ? null : stagePath[step - 1]!, toStage: stage, at: at(step),
      actorUserId: step === 0 ? null : makerId,
      note: step === 0 ? `Opened for paid order ${order!.number}.` : stage === 'blank_assigned' ? `Blank ${plan.blank!.code} assigned.` : stage === 'cut' ? `Cut on ${plan.blank!.code}.` : null,
    })))
    if (plan.blank && plan.blank.state !== blankStateAt(plan.stage)) {
      const blankState = blankStateAt(plan.stage)
      const states = ['tested_pass', 'reserved', 'cut', 'shipped'] as const
      const passed = states.slice(states.indexOf(plan.blank.state as typeof states[number]), states.indexOf(blankState) + 1)
      for (const [step, to] of passed.slice(1).entries()) {
        const reason = `${to === 'reserved' ? 'Reserved for' : to === 'cut' ? 'Cut for' : 'Shipped with'} ticket #${ticket!.id} (order ${order!.number}).`
        await moveBlank(tx, plan.blank.id, { from: passed[step]!, to, reason, byUserId: makerId, details: { ticketId: ticket!.id }, at: at(step + 1) })
      }
    }
  }
  return stages.length
}
