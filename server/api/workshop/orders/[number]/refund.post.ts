import { z } from 'zod'

const paramsSchema = z.object({ number: z.string().trim().min(1).max(40) })

/** POST /api/workshop/orders/{number}/refund (maker): a refund of all or part of a paid order, with what goes back on sale. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const input = await readBodyWith(event, refundRequestSchema)
  const answer = await requestRefund(await useDB(), number, input, maker.id)
  setResponseStatus(event, 202)
  return answer
})
