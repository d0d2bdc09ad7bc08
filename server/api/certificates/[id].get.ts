import { z } from 'zod'

const querySchema = z.object({ t: z.string().max(100).optional() })

// The order's owner, the maker, a guest with the order's signed link, or whoever holds this certificate's
// own key (the QR code on the packing slip); to anyone else (and before the cut) it does not exist.
export default defineEventHandler(async (event) => {
  const { id } = paramsWith(event, idParamsSchema)
  const { t } = queryWith(event, querySchema)
  const user = await currentUser(event)
  const found = await ticketCertificate(await useDB(), id)
  if (!found || !mayReadOrderCertificates(user, found.order, t, id)) {
    throw notFoundError('No such certificate.')
  }
  return found.certificate
})
