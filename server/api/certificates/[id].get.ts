import { z } from 'zod'

const querySchema = z.object({ t: z.string().max(100).optional() })

// The order's owner, the maker, or a guest with the order's signed link; to anyone else (and before
// the cut) the certificate does not exist.
export default defineEventHandler(async (event) => {
  const { id } = paramsWith(event, idParamsSchema)
  const { t } = queryWith(event, querySchema)
  const user = await currentUser(event)
  const found = await ticketCertificate(await useDB(), id)
  if (!found || !mayReadOrderCertificates(user, found.order, t)) {
    throw notFoundError('No such certificate.')
  }
  return found.certificate
})
