import type Stripe from 'stripe'
import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { paymentEvents } from '../../db/schema'

// A signed body is still checked for the shape the handlers rely on (ids are logged and stored).
const envelopeSchema = z.object({
  id: z.string().regex(/^[\w-]{1,255}$/),
  type: z.string().regex(/^[\w.]{1,100}$/),
  data: z.object({ object: z.object({}) }),
})

// Fulfilment happens here and only here: the success page merely shows what this recorded.
export default defineEventHandler(async (event) => {
  const raw = await readRawBody(event, false)
  const signature = getRequestHeader(event, 'stripe-signature')
  if (!raw || !signature) throw createError({ statusCode: 400, statusMessage: 'Bad webhook', message: 'Missing body or Stripe-Signature header.' })
  let paymentEvent: Stripe.Event
  try {
    // The signature, and its time within 5 minutes either way of ours.
    paymentEvent = verifiedPaymentEvent(raw, signature)
  }
  catch (error) {
    throw createError({ statusCode: 400, statusMessage: 'Bad signature', message: `Webhook signature check failed: ${error instanceof Error ? error.message : 'unknown error'}` })
  }
  if (!envelopeSchema.safeParse(paymentEvent).success) throw createError({ statusCode: 400, statusMessage: 'Bad webhook', message: 'The event has no usable id, type or object.' })

  const db = await useDB()
  const result = await db.transaction(async (tx) => {
    const [fresh] = await tx.insert(paymentEvents).values({ eventId: paymentEvent.id, type: paymentEvent.type, outcome: 'processing' })
      .onConflictDoNothing().returning()
    if (!fresh) return { duplicate: true, outcome: 'already handled' }
    const handled = await handlePaymentEvent(tx, paymentEvent)
    await tx.update(paymentEvents).set({ outcome: handled.outcome, orderId: handled.orderId ?? null }).where(eq(paymentEvents.eventId, paymentEvent.id))
    return { duplicate: false, outcome: handled.outcome, ignored: handled.ignored, followUp: handled.followUp }
  })
  if (result.ignored) {
    // Signed, but not about the order it names: answered 200 so it is not sent again, and nothing changed.
    console.warn(`[webhook] ignored ${paymentEvent.id} (${paymentEvent.type}): ${result.ignored}`)
    return { received: true, duplicate: false, ignored: true, outcome: result.outcome }
  }
  if (result.followUp) await result.followUp().catch(error => console.error('[webhook] follow-up failed:', error))
  return { received: true, duplicate: result.duplicate, outcome: result.outcome }
})
