import { z } from 'zod'

const paramsSchema = z.object({ id: z.coerce.number({ error: 'id must be a number' }).int().positive() })

/** A stage change by the transition table (shared/utils/ticketLifecycle.ts), or `recut`; 409 says why a move is refused. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, paramsSchema)
  const change = await readBodyWith(event, ticketStageChangeSchema)
  return await changeTicketStage(await useDB(), id, change, maker.id)
})
