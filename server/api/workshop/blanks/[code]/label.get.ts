import { eq } from 'drizzle-orm'
import bwipjs from 'bwip-js/node'
import { waxBatches } from '../../../../db/schema'

/** What the printable label carries: the code as a Code 128 barcode (SVG drawn here), batch and format. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const db = await useDB()
  const blank = await findBlankByCode(db, code)
  const batch = (await db.select({ code: waxBatches.code, formula: waxBatches.formula }).from(waxBatches).where(eq(waxBatches.id, blank.batchId)))[0]!
  // The code is checked against GW-yy-nnnn above, so the SVG holds nothing but bars drawn from it.
  const barcodeSvg = bwipjs.toSVG({ bcid: 'code128', text: blank.code, scale: 2, height: 14, includetext: false, paddingwidth: 10, paddingheight: 4 })
  return {
    code: blank.code,
    batchCode: batch.code,
    formula: batch.formula,
    format: blank.format,
    diameterIn: blank.diameterIn,
    surface: blankCurrentSurface(blank.surfacesUsed),
    barcodeSvg,
  }
})
