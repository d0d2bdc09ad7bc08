import { z } from 'zod'

const querySchema = z.object({ t: z.string().max(100).optional() })

/**
 * GET /api/orders/{number}/proofs/{proofId}/audio: the proof's recording, seekable (byte ranges), for
 * the order's owner, a guest holding the signed link (`?t=`) or a maker; anyone else gets 404.
 */
export default defineEventHandler(async (event) => {
  const params = paramsWith(event, proofParamsSchema)
  const { t } = queryWith(event, querySchema)
  const { proof } = await proofForViewer(event, params, t, { makerMay: true })
  return await sendStoredFile(event, await proofFile(proof))
})
