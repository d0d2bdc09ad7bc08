import { z } from 'zod'

const assignSchema = ticketAssignSchema.extend({
  /** Why a blank of another format or wax than the order wants is used all the same (kept on the ticket). */
  overrideReason: z.string({ error: 'overrideReason must be text' }).trim().min(1, 'overrideReason is required when given').max(300, 'overrideReason is at most 300 characters').optional(),
})

/** Ties a tested blank to the ticket; 409 with the reason when the blank may not go to it. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const { blankCode, overrideReason } = await readBodyWith(event, assignSchema)
  return await assignBlankToTicket(await useDB(), id, blankCode, maker.id, overrideReason)
})
