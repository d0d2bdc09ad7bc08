import { z } from 'zod'

const querySchema = z.object({ t: z.string().max(100).optional() })

/**
 * POST /api/orders/{number}/proofs/{proofId}/recut { note, pay? } (owner or guest link): asks for a
 * re-cut with a note, once per proof. Past the shop's free re-cuts it is 402 with the price
 * (`data.paidRecutMinor`) unless `pay: true` agrees to it; the maker then invoices the re-cut.
 */
export default defineEventHandler(async (event) => {
  const params = paramsWith(event, proofParamsSchema)
  const body = await readBodyWith(event, proofRecutBodySchema)
  const found = await proofForViewer(event, params, body.t ?? queryWith(event, querySchema).t, { makerMay: false })
  return await answerProof(found, { kind: 'recut', note: body.note, pay: body.pay })
})
