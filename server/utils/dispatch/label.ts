import { parcelAddressLines, code128Png, code128Width, dispatchPdfBuffer, dispatchPdfFonts, drawCode128, newDispatchPdf } from './pdf'
import type { PackingSlip } from './slip'

/** A 4 × 6 in address label (288 × 432 pt), as thermal label printers take. */
export const addressLabelSize: [number, number] = [288, 432]

const EDGE = 14
const INK = '#111111'

/**
 * The parcel's address label: from (small) and to (large), the order number as a Code 128 barcode
 * and the FRAGILE and KEEP COOL marks. Drawn from the same read of the order as the packing slip.
 */
export async function drawAddressLabel(slip: PackingSlip): Promise<Buffer> {
  const fonts = await dispatchPdfFonts()
  const [pageWidth, pageHeight] = addressLabelSize
  const doc = newDispatchPdf(addressLabelSize, fonts, `Address label ${slip.number}`)
  const width = pageWidth - 2 * EDGE
  let y = EDGE

  // From.
  doc.font('Bold').fontSize(7).fillColor(INK).text('FROM', EDGE, y, { characterSpacing: 1 })
  doc.font('Body').fontSize(8).text([slip.shop.name, ...slip.shop.addressLines].join('\n'), EDGE, doc.y + 1, { width })
  y = doc.y + 8
  doc.moveTo(EDGE, y).lineTo(EDGE + width, y).lineWidth(1).strokeColor(INK).stroke()
  y += 8

  // To, as large as it fits.
  const [name, ...rest] = parcelAddressLines(slip.shipTo)
  doc.font('Bold').fontSize(9).text('TO', EDGE, y, { characterSpacing: 1 })
  let size = 15
  const toHeight = () => doc.font('Bold').fontSize(size + 1).heightOfString(name ?? '', { width }) + doc.font('Body').fontSize(size).heightOfString(rest.join('\n'), { width })
  while (size > 9 && toHeight() > 150) size -= 1
  doc.font('Bold').fontSize(size + 1).text(name ?? '', EDGE, doc.y + 2, { width })
  doc.font('Body').fontSize(size).text(rest.join('\n'), EDGE, doc.y, { width })
  y = doc.y + 10

  // The order barcode, centred, with its quiet zone, and the number in words beneath.
  const barcode = await code128Png(slip.number)
  const modulePt = Math.min(1.6, width / (barcode.modules + 20))
  const barcodeX = EDGE + (width - code128Width(barcode, modulePt)) / 2
  const marksTop = pageHeight - EDGE - 62
  const barcodeHeight = Math.max(36, Math.min(60, marksTop - y - 30))
  drawCode128(doc, barcode, barcodeX, y, modulePt, barcodeHeight)
  doc.font('Bold').fontSize(12).text(`Order ${slip.number}`, EDGE, y + barcodeHeight + 4, { width, align: 'center' })

  // The marks.
  const half = (width - 8) / 2
  for (const [index, mark] of ['FRAGILE', 'KEEP COOL'].entries()) {
    const x = EDGE + index * (half + 8)
    doc.rect(x, marksTop, half, 38).fill(INK)
    doc.font('Bold').fontSize(17).fillColor('#ffffff').text(mark, x, marksTop + 10, { width: half, align: 'center', lineBreak: false })
  }
  doc.font('Body').fontSize(7.5).fillColor(INK).text('Wax records inside: keep them from heat and sun.', EDGE, marksTop + 44, { width, align: 'center', lineBreak: false })
  return await dispatchPdfBuffer(doc)
}
