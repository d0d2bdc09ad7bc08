import type Stripe from 'stripe'
import { eq } from 'drizzle-orm'
import { paymentEvents } from '../../db/schema'

// Fulfilment happens here and only here: the success page merely shows what this recorded.
export default defineEventHandler(async (event) => {
  const raw = await readRawBody(event, false)
  const signature = getRequestHeader(event, 'stripe-signature')
  if (!raw || !signature) throw createError({ statusCode: 400, statusMessage: 'Bad webhook', message: 'Missing body or Stripe-Signature header.' })
  let paymentEvent: Stripe.Event
  try {
    paymentEvent = useStripe().webhooks.constructEvent(raw, signature, webhookSecret(), 300)
  }
  catch (error) {
    throw createError({ statusCode: 400, statusMessage: 'Bad signature', message: `Webhook signature check failed: ${error instanceof Error ? error.message : 'unknown error'}` })
  }

  const db = await useDB()
  const result = await db.transaction(async (tx) => {
    const [fresh] = await tx.insert(paymentEvents).values({ eventId: paymentEvent.id, type: paymentEvent.type, outcome: 'processing' })
      .onConflictDoNothing().returning()
    if (!fresh) return { duplicate: true, outcome: 'already handled' }
    const handled = await handlePaymentEvent(tx, paymentEvent)
    await tx.update(paymentEvents).set({ outcome: handled.outcome, orderId: handled.orderId ?? null }).where(eq(paymentEvents.eventId, paymentEvent.id))
    return { duplicate: false, outcome: handled.outcome, followUp: handled.followUp }
  })
  if (result.followUp) await result.followUp().catch(error => console.error('[webhook] follow-up failed:', error))
  return { received: true, duplicate: result.duplicate, outcome: result.outcome }
})
