import { z } from 'zod'

const querySchema = z.object({ q: z.string().trim().toUpperCase().max(40, 'q is too long').optional() })

/**
 * The blanks this ticket may take (the picker): its format and wax formula, tested and passed on the
 * current surface within the shop's age limit, held by no open ticket.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const { q } = queryWith(event, querySchema)
  return await eligibleBlanksForTicket(await useDB(), id, q || undefined)
})
