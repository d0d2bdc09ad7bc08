import { z } from 'zod'

const paramsSchema = z.object({ number: z.string().trim().toUpperCase().min(1, 'number is required').max(40, 'number is too long') })

/*
 * GET /api/dispatch/<number>/label.pdf (shipper or maker): the 4 × 6 in address label: from and to,
 * the order's barcode, FRAGILE and KEEP COOL.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const slip = await packingSlipOrder(await useDB(), number)
  if (!slip) throw notFoundError('No such order.')
  const pdf = await drawAddressLabel(slip)
  setResponseHeaders(event, {
    'content-type': 'application/pdf',
    'content-disposition': inlineDisposition(`address-label-${slip.number}.pdf`),
  })
  return pdf
})
