import { z } from 'zod'

const paramsSchema = z.object({ number: z.string().trim().toUpperCase().min(1, 'number is required').max(40, 'number is too long') })
const querySchema = z.object({
  paper: z.enum(['a4', 'letter'], { error: 'paper must be a4 or letter' }).default('a4'),
})

/*
 * GET /api/dispatch/<number>/slip.pdf?paper=a4|letter (shipper or maker): the packing slip to print
 * and put in the parcel: addresses, the order's barcode, what is inside with each made cylinder's
 * certificate code, and the handling cautions. No prices.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'shipper', 'maker')
  const { number } = paramsWith(event, paramsSchema)
  const { paper } = queryWith(event, querySchema)
  const slip = await packingSlipOrder(await useDB(), number)
  if (!slip) throw notFoundError('No such order.')
  const pdf = await drawPackingSlip(slip, paper)
  setResponseHeaders(event, {
    'content-type': 'application/pdf',
    'content-disposition': inlineDisposition(`packing-slip-${slip.number}-${paper}.pdf`),
  })
  return pdf
})
