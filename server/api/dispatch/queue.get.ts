import { z } from 'zod'

/*
 * GET /api/dispatch/queue?q= (shipper or maker) → { readyToPack, held, packed, shipped, more }
 *
 * The orders to pack (most urgent first), those a heat check holds back, those packed and waiting for
 * the carrier, and those shipped or delivered in the last 30 days; `q` finds packed and shipped orders
 * by order or tracking number. Each with where it goes, what is in it and the engine's packing. Nothing
 * about payments: the shipper sees what to pack and where, not what it cost.
 */
const querySchema = z.object({ q: z.string({ error: 'q must be text' }).trim().max(60, 'q is at most 60 characters').optional() })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'shipper', 'maker')
  const { q } = queryWith(event, querySchema)
  return await dispatchQueue(await useDB(), q || undefined)
})
