import { eq } from 'drizzle-orm'
import bwipjs from 'bwip-js/node'
import { blanks, waxBatches } from '../../../../db/schema'

/** What the printable label carries: the code as a Code 128 barcode (SVG drawn here), batch and format. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const db = await useDB()
  const [found] = await db.select({ blank: blanks, batchCode: waxBatches.code, formula: waxBatches.formula })
    .from(blanks).innerJoin(waxBatches, eq(waxBatches.id, blanks.batchId)).where(eq(blanks.code, code)).limit(1)
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Not found', message: `No blank has the code ${code}.` })
  // The code is checked against GW-yy-nnnn above, so the SVG holds nothing but bars drawn from it.
  const barcodeSvg = bwipjs.toSVG({ bcid: 'code128', text: found.blank.code, scale: 2, height: 14, includetext: false, paddingwidth: 10, paddingheight: 4 })
  return {
    code: found.blank.code,
    batchCode: found.batchCode,
    formula: found.formula,
    format: found.blank.format,
    diameterIn: found.blank.diameterIn,
    surface: blankCurrentSurface(found.blank.surfacesUsed),
    barcodeSvg,
  }
})
