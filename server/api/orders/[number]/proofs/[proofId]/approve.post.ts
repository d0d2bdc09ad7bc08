import { z } from 'zod'

const querySchema = z.object({ t: z.string().max(100).optional() })

/**
 * POST /api/orders/{number}/proofs/{proofId}/approve (the order's owner, or a guest's signed link as
 * `t` in the address or the body): the proof is approved, once; a second answer is 409.
 */
export default defineEventHandler(async (event) => {
  const params = paramsWith(event, proofParamsSchema)
  const body = await readBodyWith(event, proofApproveBodySchema)
  const found = await proofForViewer(event, params, body.t ?? queryWith(event, querySchema).t, { makerMay: false })
  return await answerProof(found, { kind: 'approved' })
})
