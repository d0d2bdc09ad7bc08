import { createHash } from 'node:crypto'
import type { H3Event } from 'h3'
import type Stripe from 'stripe'
import { and, eq, isNull, lt } from 'drizzle-orm'
import { customMessages, files, orderItems, orders, proofs, tickets, users } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction

const proofMimes = ['audio/wav', 'audio/mpeg']

async function makerEmails(db: Db): Promise<string[]> {
  return (await db.select({ email: users.email }).from(users).where(eq(users.role, 'maker')).orderBy(users.id)).map(row => row.email)
}

/** The message an order item carries, for a mail's words ("Birthday for Ada"). */
async function messageWords(db: Db, orderItemId: number): Promise<string> {
  const [message] = await db.select({ occasion: customMessages.occasion, recipientName: customMessages.recipientName }).from(customMessages).where(eq(customMessages.orderItemId, orderItemId))
  return message ? `${message.occasion} for ${message.recipientName}` : 'your personal message'
}

/**
 * The maker sends a proof: a WAV or MP3 transfer of the cut (by content, up to the recording limit),
 * only while the ticket is `cut`. The proof waits for the customer's answer, the ticket goes to
 * proof_sent and the order to proof_pending, and the customer gets one mail with the link to hear it.
 */
export async function uploadProof(event: H3Event, ticketId: number, makerId: number) {
  const { file, fields } = await readUploadForm(event, 'surface_test', { required: 'choose the proof\'s recording (WAV or MP3)' })
  const note = (fields.note ?? '').trim()
  if (note.length > 1000) throw fieldError('note', 'note must be at most 1000 characters')
  const { taken } = await sniffFile(file!.data)
  if (!taken || !proofMimes.includes(taken.mime)) {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: `file: a proof is a WAV or MP3 recording; by its content this file is ${taken ? `a ${taken.format} file` : 'not one'}. Nothing was stored.`, data: { fields: { file: 'only WAV or MP3' } } })
  }
  checkAudioSample(file!.data, taken.mime)
  const db = await useDB()
  return await db.transaction(async (tx) => {
    const { ticket, order, kind } = await lockTicketForMove(tx, ticketId)
    if (kind !== 'custom') throw conflictError(`Ticket #${ticket.id} is a recorded cylinder: only a personal message gets a proof.`)
    if (ticket.stage !== 'cut') throw conflictError(`Ticket #${ticket.id} is ${ticketStageLabels[ticket.stage].toLowerCase()}: a proof is sent once the message is cut (stage "cut").`)
    const stored = await storeFile(tx, { data: file!.data, mime: taken.mime, purpose: 'proof', originalName: fileLabel(file!.filename, `proof-${order.number}.${taken.mime === 'audio/wav' ? 'wav' : 'mp3'}`), isPublic: false, uploadedBy: makerId })
    const [proof] = await tx.insert(proofs).values({ ticketId: ticket.id, fileId: stored.id, note, uploadedBy: makerId }).returning()
    await moveTicketForProof(tx, ticket, 'sent', 'Proof sent to the customer.', makerId)
    const [full] = await tx.select().from(orders).where(eq(orders.id, order.id))
    const words = await messageWords(tx, ticket.orderItemId)
    await queueMail(tx, {
      to: full!.email,
      subject: `A proof of your message is ready to hear — order ${full!.number}`,
      dedupeKey: `proof-ready:${proof!.id}`,
      content: {
        heading: 'Your proof is ready',
        paragraphs: [
          `The maker has cut ${words} and made a proof for you to hear.${note ? ` A note from the maker: ${note}` : ''}`,
          'Listen to it on your order page, then approve it or ask for a re-cut with a note saying what to change. The record is finished only once you approve.',
        ],
        action: { label: 'Hear your proof', url: orderLink(full!.number, full!.userId !== null) },
      },
    })
    setResponseStatus(event, 201)
    return { id: proof!.id, ticketId: ticket.id, stage: 'proof_sent' as const, orderNumber: full!.number, fileId: stored.id, bytes: stored.bytes, mime: stored.mime }
  })
}

/**
 * The order and one of its proofs, for whoever may see them: the order's owner, a guest holding the
 * order's signed link, or (with `makerMay`) a maker. Anyone else gets the same 404 as for no order.
 */
export async function proofForViewer(event: H3Event, params: { number: string, proofId: number }, token: string | undefined, options: { makerMay: boolean }) {
  const user = await currentUser(event)
  const db = await useDB()
  const [order] = await db.select().from(orders).where(eq(orders.number, params.number.toUpperCase()))
  const owner = !!order && ((user !== null && order.userId === user.id) || (token !== undefined && orderAccessTokenValid(order.number, token)))
  const maker = user?.role === 'maker'
  if (!order || !(owner || (options.makerMay && maker))) {
    if (order && maker && !options.makerMay) {
      throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the customer answers a proof here; to answer on their behalf, move the ticket with a note saying how they answered.' })
    }
    throw notFoundError('No such order.')
  }
  const [row] = await db.select({ proof: proofs, ticket: tickets }).from(proofs).innerJoin(tickets, eq(tickets.id, proofs.ticketId))
    .where(and(eq(proofs.id, params.proofId), eq(tickets.orderId, order.id)))
  if (!row) throw notFoundError('No such proof.')
  return { order, proof: row.proof, ticket: row.ticket, user }
}

/** The proof's recording as a stored-file answer (byte ranges, private caching). */
export async function proofFile(proof: ProofRow) {
  const db = await useDB()
  const [file] = proof.fileId ? await db.select().from(files).where(eq(files.id, proof.fileId)) : []
  if (!file) throw notFoundError('No such proof.')
  return file
}

/** Marks a waiting proof answered; false when it had been answered already. */
async function markAnswered(tx: Db, proofId: number, answer: 'approved' | 'recut', values: { note: string, via: 'customer' | 'maker', by: number | null, paid?: boolean }) {
  const [answered] = await tx.update(proofs)
    .set({ answer, answerNote: values.note, answeredVia: values.via, answeredBy: values.by, answeredAt: new Date(), paidRecut: values.paid ?? false })
    .where(and(eq(proofs.id, proofId), eq(proofs.answer, 'waiting'))).returning({ id: proofs.id })
  return !!answered
}

/** When the maker moves a ticket on from proof_sent, the proof still waiting is answered on the customer's behalf. */
export async function answerWaitingProofForCustomer(tx: Db, ticketId: number, answer: 'approved' | 'recut', note: string, makerId: number) {
  const [waiting] = await tx.select({ id: proofs.id }).from(proofs).where(and(eq(proofs.ticketId, ticketId), eq(proofs.answer, 'waiting')))
  if (waiting) await markAnswered(tx, waiting.id, answer, { note, via: 'maker', by: makerId })
}

const alreadyAnswered = (proof: ProofRow) => conflictError(`This proof has already been answered (${proof.answer === 'approved' ? 'approved' : proof.answer === 'recut' ? 're-cut asked for' : 'answered'}); reload your order to see where it stands.`, { answer: proof.answer })

/**
 * The customer answers a proof, once: approve (the ticket goes to approved and the order on as its
 * tickets say), or ask for a re-cut with a note (the ticket goes back to be cut again, counted). After
 * the shop's free re-cuts, a re-cut is 402 with its price unless the customer agrees to pay (`pay`):
 * then a payment page for the fee is opened (`{ url }`) and the re-cut is made when the payment's
 * webhook confirms it (`settlePaidRecut`). Mails: approved → customer and makers; re-cut → makers.
 */
export async function answerProof(found: Awaited<ReturnType<typeof proofForViewer>>, answer: { kind: 'approved' } | { kind: 'recut', note: string, pay: boolean }) {
  const { order, proof, user } = found
  if (proof.answer !== 'waiting') throw alreadyAnswered(proof)
  const db = await useDB()
  const settings = await getSetting('engine', db)
  if (answer.kind === 'recut' && answer.pay && found.ticket.recuts >= settings.custom.freeRecuts) {
    return await openPaidRecutPayment(order, proof, answer.note, settings.custom.paidRecutMinor)
  }
  return await db.transaction(async (tx) => {
    const { ticket } = await lockTicketForMove(tx, proof.ticketId)
    const [current] = await tx.select().from(proofs).where(eq(proofs.id, proof.id))
    if (!current || current.answer !== 'waiting') throw alreadyAnswered(current ?? proof)
    if (answer.kind === 'recut' && ticket.recuts >= settings.custom.freeRecuts) {
      // Past the free re-cuts (counted under the lock): the customer is told the price and may pay it.
      const price = formatMoney(settings.custom.paidRecutMinor, order.currency)
      throw createError({ statusCode: 402, statusMessage: 'Payment Required', message: `You have used your free re-cut${settings.custom.freeRecuts === 1 ? '' : 's'}; a further re-cut costs ${price}.`, data: { paidRecutMinor: settings.custom.paidRecutMinor, currency: order.currency } })
    }
    const note = answer.kind === 'recut' ? answer.note : ''
    if (!await markAnswered(tx, proof.id, answer.kind, { note, via: 'customer', by: user?.id ?? null })) throw alreadyAnswered(proof)
    const moved = await moveTicketForProof(tx, ticket, answer.kind, answer.kind === 'approved' ? 'The customer approved the proof.' : note, user?.id ?? null)
    if (!moved) throw conflictError('The workshop has moved this message on meanwhile; reload your order to see where it stands.')
    await queueAnswerMails(tx, order, ticket.orderItemId, proof.id, answer.kind, note, null)
    return { id: proof.id, answer: answer.kind, paidRecut: false, ticketStage: answer.kind === 'approved' ? 'approved' as const : 'blank_assigned' as const }
  })
}

/** Keys of the payment page's metadata: the service keeps at most 500 characters a value, so the note is split. */
const NOTE_PART = 480

/**
 * A payment page for a re-cut past the free ones. Nothing changes until the payment is confirmed: the
 * proof stays waiting (the customer may still approve it instead). The same proof and note open the
 * same page (idempotency key).
 */
async function openPaidRecutPayment(order: OrderRow, proof: ProofRow, note: string, amountMinor: number) {
  const back = orderLink(order.number, order.userId !== null)
  const noteKey = createHash('sha256').update(note).digest('hex').slice(0, 16)
  // An empty metadata value means "no such key" to the payment service: only the parts the note fills.
  const noteParts = Object.fromEntries([0, 1, 2].map(part => [`note_${part + 1}`, note.slice(part * NOTE_PART, (part + 1) * NOTE_PART)]).filter(([, text]) => text !== ''))
  try {
    const session = await useStripe().checkout.sessions.create({
      mode: 'payment',
      customer_email: order.email,
      client_reference_id: order.number,
      metadata: { purpose: 'paid_recut', order_number: order.number, proof_id: String(proof.id), ...noteParts },
      payment_intent_data: { metadata: { purpose: 'paid_recut', proof_id: String(proof.id) } },
      line_items: [{ quantity: 1, price_data: { currency: order.currency.toLowerCase(), unit_amount: amountMinor, product_data: { name: `A further re-cut of your personal message (order ${order.number})` } } }],
      success_url: back,
      cancel_url: back,
    }, { idempotencyKey: `recut-${proof.id}-${noteKey}-${amountMinor}` })
    return { id: proof.id, answer: 'waiting' as const, paidRecut: false, paidRecutMinor: amountMinor, url: session.url }
  }
  catch (error) {
    console.error('[messages] re-cut payment page failed:', error instanceof Error ? error.message : error)
    throw createError({ statusCode: 502, statusMessage: 'Payment service unavailable', message: 'The payment service could not be reached. Nothing was charged and your proof still waits for your answer; try again in a minute.' })
  }
}

/**
 * The payment service confirms a paid re-cut (webhook or sweep): the proof is answered `recut` (paid),
 * the ticket goes back to be cut again and the makers are told. The session is read back from the
 * payment service, so only a real, paid page of this shop for this proof counts; a proof answered
 * meanwhile is left alone and the outcome says so, for the maker to refund.
 */
export async function settlePaidRecut(tx: Transaction, event: Stripe.Checkout.Session): Promise<{ outcome: string, orderId?: number, ignored?: string }> {
  const ignore = (reason: string, orderId?: number) => ({ outcome: `ignored: ${reason}`, ignored: reason, orderId })
  const number = event.metadata?.order_number
  const proofId = Number(event.metadata?.proof_id)
  if (typeof number !== 'string' || !Number.isSafeInteger(proofId) || proofId < 1 || proofId > 2_147_483_647) return ignore('names no re-cut of this shop')
  const [order] = await tx.select().from(orders).where(eq(orders.number, number))
  if (!order) return ignore('names no order of this shop')
  const [row] = await tx.select({ proof: proofs, ticket: tickets }).from(proofs).innerJoin(tickets, eq(tickets.id, proofs.ticketId))
    .where(and(eq(proofs.id, proofId), eq(tickets.orderId, order.id)))
  if (!row) return ignore(`proof ${proofId} is not of order ${order.number}`, order.id)
  const session = await useStripe().checkout.sessions.retrieve(event.id).catch(() => null)
  if (!session || session.status !== 'complete' || session.payment_status !== 'paid' || session.metadata?.proof_id !== String(proofId) || session.metadata?.purpose !== 'paid_recut') {
    return ignore(`session ${JSON.stringify(String(event.id).slice(0, 80))} is not a paid re-cut page of proof ${proofId}`, order.id)
  }
  if ((session.currency ?? '').toLowerCase() !== order.currency.toLowerCase()) return ignore(`currency ${JSON.stringify(session.currency)} is not the order's`, order.id)
  const note = [session.metadata?.note_1, session.metadata?.note_2, session.metadata?.note_3].filter(Boolean).join('') || 'A paid re-cut.'
  const { ticket } = await lockTicketForMove(tx, row.ticket.id)
  if (!await markAnswered(tx, proofId, 'recut', { note, via: 'customer', by: order.userId, paid: true })) {
    return ignore(`proof ${proofId} was answered before the re-cut was paid: refund ${formatMoney(session.amount_total ?? 0, order.currency)}`, order.id)
  }
  if (!await moveTicketForProof(tx, ticket, 'recut', note, order.userId)) return ignore(`the ticket of proof ${proofId} had moved on: refund the re-cut`, order.id)
  await queueAnswerMails(tx, order, ticket.orderItemId, proofId, 'recut', note, `${formatMoney(session.amount_total ?? 0, order.currency)} (paid)`)
  return { outcome: 'paid re-cut', orderId: order.id }
}

async function queueAnswerMails(tx: Transaction, order: OrderRow, orderItemId: number, proofId: number, answer: 'approved' | 'recut', note: string, paidPrice: string | null) {
  const words = await messageWords(tx, orderItemId)
  const site = String(useRuntimeConfig().siteUrl)
  const makers = await makerEmails(tx)
  if (answer === 'approved') {
    await queueMail(tx, {
      to: order.email,
      subject: `You approved the proof — order ${order.number}`,
      dedupeKey: `proof-approved:${proofId}:customer`,
      content: {
        heading: 'Thank you — proof approved',
        paragraphs: [`You approved the proof of ${words}. The maker finishes the record and it goes to be packed; we tell you when the parcel leaves.`],
        action: { label: 'Follow your order', url: orderLink(order.number, order.userId !== null) },
      },
    })
  }
  for (const maker of makers) {
    await queueMail(tx, {
      to: maker,
      subject: answer === 'approved' ? `Proof approved — order ${order.number}` : `Re-cut asked for — order ${order.number}`,
      dedupeKey: `proof-${answer}:${proofId}:maker:${maker}`,
      content: {
        heading: answer === 'approved' ? 'The customer approved the proof' : 'The customer asks for a re-cut',
        paragraphs: answer === 'approved'
          ? [`The proof of ${words} (order ${order.number}) is approved: the ticket is at "approved" and can go to dispatch.`]
          : [
              `The customer asks for a re-cut of ${words} (order ${order.number}). Their note: ${note}`,
              ...(paidPrice ? [`This re-cut is past the free ones: the customer has paid ${paidPrice} for it.`] : []),
              'The ticket is back at "blank assigned": assign a fresh tested blank, cut again and send a new proof.',
            ],
        action: { label: 'Open the tickets', url: `${site}/workshop/tickets?q=${order.number}` },
      },
    })
  }
}

/**
 * A proof left waiting `custom.proofReminderDays` gets one reminder to the customer. The mark is set
 * conditionally (only where none is set yet) in the same transaction as the mail, so two servers
 * sweeping at once send it once.
 */
export async function sendProofReminders(now = new Date()) {
  const db = await useDB()
  const settings = await getSetting('engine', db)
  const before = new Date(now.getTime() - settings.custom.proofReminderDays * 86_400_000)
  const due = await db.select({ proof: proofs, ticket: tickets }).from(proofs).innerJoin(tickets, eq(tickets.id, proofs.ticketId))
    .where(and(eq(proofs.answer, 'waiting'), isNull(proofs.reminderSentAt), lt(proofs.createdAt, before))).limit(50)
  let sent = 0
  for (const { proof, ticket } of due) {
    const done = await db.transaction(async (tx) => {
      const [marked] = await tx.update(proofs).set({ reminderSentAt: now })
        .where(and(eq(proofs.id, proof.id), isNull(proofs.reminderSentAt), eq(proofs.answer, 'waiting'))).returning({ id: proofs.id })
      if (!marked) return false
      const [order] = await tx.select().from(orders).where(eq(orders.id, ticket.orderId))
      if (!order) return false
      await queueMail(tx, {
        to: order.email,
        subject: `Your proof is waiting for your answer — order ${order.number}`,
        dedupeKey: `proof-reminder:${proof.id}`,
        content: {
          heading: 'Your proof is waiting',
          paragraphs: [
            `The proof of ${await messageWords(tx, ticket.orderItemId)} has been waiting ${settings.custom.proofReminderDays} days for your answer. Please listen to it and approve it, or ask for a re-cut with a note.`,
            'If we do not hear from you, the maker will be in touch to decide with you how to go on.',
          ],
          action: { label: 'Hear your proof', url: orderLink(order.number, order.userId !== null) },
        },
      })
      return true
    })
    if (done) sent++
  }
  return sent
}

/** The order item of a ticket's message, with the ticket: for the cue sheet and the ticket answers. */
export async function ticketMessage(db: Db, ticketId: number) {
  const [row] = await db.select({ ticket: tickets, item: orderItems, message: customMessages }).from(tickets)
    .innerJoin(orderItems, eq(orderItems.id, tickets.orderItemId))
    .leftJoin(customMessages, eq(customMessages.orderItemId, orderItems.id))
    .where(eq(tickets.id, ticketId))
  return row ?? null
}
