import { z } from 'zod'

const paramsSchema = z.object({ id: z.coerce.number({ error: 'id must be a number' }).int().positive() })

/** Ties a tested blank to the ticket; 409 with the reason when the blank may not go to it. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, paramsSchema)
  const { blankCode } = await readBodyWith(event, ticketAssignSchema)
  return await assignBlankToTicket(await useDB(), id, blankCode, maker.id)
})
