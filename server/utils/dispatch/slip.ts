import { asc, eq } from 'drizzle-orm'
import { blanks, customMessages, orderItems, orders, products, tickets } from '../../db/schema'
import type { ShippingAddress } from '../../db/schema'
import type { Database } from '../platform/db'
import { cylinderFormats, standardCylinderRpm, type CylinderFormat } from '#shared/utils/cylinder'
import { parcelAddressLines, code128Png, code128Width, dispatchPdfBuffer, dispatchPdfFonts, drawCode128, newDispatchPdf, qrPng } from './pdf'

/*
 * The packing slip: what goes in the parcel and how to treat it, for the carrier and the recipient.
 * Read-only: the order, its items, the tickets with their blanks (for the blank codes and the test
 * certificates). Never a price: the slip may travel as a gift.
 */

export const slipPapers = {
  a4: { label: 'A4', size: [595.28, 841.89] as [number, number] },
  letter: { label: 'Letter', size: [612, 792] as [number, number] },
}
export type SlipPaper = keyof typeof slipPapers

/** Orders that have reached dispatch: their cylinders are made and a slip makes sense. */
const slipStatuses = ['ready_to_pack', 'packed', 'shipped', 'delivered'] as const

export interface SlipLine {
  title: string
  format: CylinderFormat
  rpm: number
  quantity: number
  /** "cylinder 1 of 2" for a made cylinder, null for stock taken from the shelf. */
  unitNote: string | null
  blankCode: string | null
  /** The public address of the made cylinder's test certificate. */
  certificateUrl: string | null
}

export interface PackingSlip {
  number: string
  shop: { name: string, addressLines: string[], email: string }
  shipTo: ShippingAddress
  lines: SlipLine[]
  careUrl: string
  siteUrl: string
}

/**
 * The slip's contents for one order, or null when there is no such order. An order not yet ready to
 * pack (or given up) is a 409: its cylinders are not all made, so no slip can say what is in the box.
 */
export async function packingSlipOrder(db: Database, number: string): Promise<PackingSlip | null> {
  const [order] = await db.select({ id: orders.id, number: orders.number, status: orders.status, userId: orders.userId, shipTo: orders.shippingAddress })
    .from(orders).where(eq(orders.number, number)).limit(1)
  if (!order) return null
  if (!(slipStatuses as readonly string[]).includes(order.status)) {
    throw conflictError(`Order ${order.number} is ${order.status.replaceAll('_', ' ')}: a packing slip is made once it is ready to pack.`)
  }
  const items = await db.select({ id: orderItems.id, title: orderItems.title, format: orderItems.format, quantity: orderItems.quantity, productRpm: products.rpm, messageRpm: customMessages.rpm })
    .from(orderItems)
    .leftJoin(products, eq(products.id, orderItems.productId))
    .leftJoin(customMessages, eq(customMessages.orderItemId, orderItems.id))
    .where(eq(orderItems.orderId, order.id)).orderBy(asc(orderItems.id))
  const made = await db.select({ id: tickets.id, orderItemId: tickets.orderItemId, unit: tickets.unit, stage: tickets.stage, cutAt: tickets.cutAt, blankCode: blanks.code })
    .from(tickets).leftJoin(blanks, eq(blanks.id, tickets.blankId))
    .where(eq(tickets.orderId, order.id)).orderBy(asc(tickets.orderItemId), asc(tickets.unit))
  const packedBlanks = await orderBlankCodes(db, order.id)
  const siteUrl = String(useRuntimeConfig().siteUrl).replace(/\/+$/, '')
  // Whoever unpacks the parcel (perhaps not the buyer: a gift) can open the certificate from its code
  // without signing in: the address carries that certificate's own key, which opens nothing else.
  const certificateKey = (ticketId: number) => `?t=${certificateAccessToken(ticketId)}`
  const shop = await getSetting('shop', db)

  const lines = items.flatMap((item): SlipLine[] => {
    const rpm = item.messageRpm ?? item.productRpm ?? standardCylinderRpm
    const base = { title: item.title, format: item.format, rpm }
    const units = made.filter(ticket => ticket.orderItemId === item.id)
    const packed = packedBlanks.get(item.id) ?? []
    if (units.length === 0 && packed.length > 0) {
      // A blank sold from the register: one line per blank packed, with its code.
      return packed.map((blankCode, index) => ({ ...base, quantity: 1, unitNote: item.quantity > 1 ? `blank ${index + 1} of ${item.quantity}` : null, blankCode, certificateUrl: null }))
    }
    if (units.length === 0) return [{ ...base, quantity: item.quantity, unitNote: null, blankCode: null, certificateUrl: null }]
    return units.map(ticket => ({
      ...base,
      quantity: 1,
      unitNote: item.quantity > 1 ? `cylinder ${ticket.unit} of ${item.quantity}` : null,
      blankCode: ticket.blankCode,
      certificateUrl: ticket.blankCode && ticket.cutAt && certifiedTicketStages.includes(ticket.stage)
        ? `${siteUrl}/certificates/${ticket.id}${certificateKey(ticket.id)}`
        : null,
    }))
  })
  return {
    number: order.number,
    shop: { name: shop.name, addressLines: shop.addressLines.filter(Boolean), email: shop.email },
    shipTo: order.shipTo,
    lines,
    careUrl: `${siteUrl}/guides/care`,
    siteUrl,
  }
}

const formatWords: Record<CylinderFormat, { short: string, pitch: string, stylus: string }> = {
  two_minute: { short: '2-minute', pitch: '100 grooves per inch', stylus: '2-minute cylinders (100 grooves per inch): play with the coarser 2-minute stylus and reproducer.' },
  four_minute: { short: '4-minute', pitch: '200 grooves per inch', stylus: '4-minute cylinders (200 grooves per inch): play only with the finer 4-minute stylus; a 2-minute stylus ruins the groove.' },
}

/** The handling cautions, in the words the slip prints; the stylus line names only the formats in the parcel. */
export function slipCautions(formats: CylinderFormat[]): { head: string, text: string }[] {
  const present = cylinderFormats.filter(format => formats.includes(format))
  return [
    { head: 'FRAGILE: WAX CYLINDERS', text: 'Handle gently. Do not drop, throw or crush; stack nothing heavy on this parcel.' },
    { head: 'KEEP AWAY FROM HEAT AND DIRECT SUN', text: 'Wax softens and warps in warmth. Keep the parcel in the shade, away from heaters and radiators.' },
    { head: 'DO NOT LEAVE IN A VEHICLE', text: 'A parked car or delivery van can reach about 60\u00A0°C (140\u00A0°F) inside: far past the point where wax softens.' },
    { head: 'LET THE PARCEL REACH ROOM TEMPERATURE BEFORE OPENING', text: 'After cold transit, leave it unopened indoors for a few hours: cold wax can crack if handled or warmed quickly.' },
    { head: 'STORE CYLINDERS UPRIGHT, STANDING ON END', text: 'Keep each cylinder in its box, standing on end, never lying on its side.' },
    { head: 'PLAY WITH THE RIGHT STYLUS', text: present.map(format => formatWords[format].stylus).join(' ') },
  ]
}

const MARGIN = 40
const INK = '#111111'
const GREY = '#555555'

/** The slip as a PDF on A4 or Letter paper; pages are added as the lines need them, each with its footer. */
export async function drawPackingSlip(slip: PackingSlip, paper: SlipPaper): Promise<Buffer> {
  const fonts = await dispatchPdfFonts()
  const [pageWidth, pageHeight] = slipPapers[paper].size
  const doc = newDispatchPdf([pageWidth, pageHeight], fonts, `Packing slip ${slip.number}`)
  const width = pageWidth - 2 * MARGIN
  const bottom = pageHeight - MARGIN - 24
  let y = MARGIN
  const newPage = () => {
    doc.addPage({ size: [pageWidth, pageHeight], margin: 0 })
    y = MARGIN
    doc.font('Bold').fontSize(11).fillColor(INK).text(`Packing slip ${slip.number}, continued`, MARGIN, y, { width, lineBreak: false })
    y += 24
  }
  /** A new page unless `height` more points fit on this one. */
  const room = (height: number) => {
    if (y + height > bottom) newPage()
  }

  // Head: the shop on the left, the order number and its barcode on the right.
  const barcode = await code128Png(slip.number)
  const modulePt = 1.2
  const rightWidth = code128Width(barcode, modulePt) + 20 * modulePt
  const rightX = MARGIN + width - rightWidth
  const leftWidth = width - rightWidth - 16
  doc.font('Bold').fontSize(17).fillColor(INK).text(slip.shop.name, MARGIN, y, { width: leftWidth })
  doc.font('Bold').fontSize(11).fillColor(GREY).text('Packing slip', MARGIN, doc.y + 2, { width: leftWidth, characterSpacing: 1 })
  const leftBottom = doc.y
  doc.font('Bold').fontSize(9).fillColor(GREY).text('ORDER', rightX, y, { width: rightWidth, align: 'center', characterSpacing: 1 })
  doc.font('Bold').fontSize(18).fillColor(INK).text(slip.number, rightX, doc.y + 1, { width: rightWidth, align: 'center' })
  const barcodeTop = doc.y + 4
  drawCode128(doc, barcode, rightX + 10 * modulePt, barcodeTop, modulePt, 40)
  y = Math.max(leftBottom, barcodeTop + 40) + 12
  doc.moveTo(MARGIN, y).lineTo(MARGIN + width, y).lineWidth(1).strokeColor(INK).stroke()
  y += 12

  // Ship to, large, and beside it the return address.
  const toWidth = Math.round(width * 0.58)
  const fromX = MARGIN + toWidth + 16
  const fromWidth = width - toWidth - 16
  const [name, ...rest] = parcelAddressLines(slip.shipTo)
  doc.font('Bold').fontSize(9).fillColor(GREY).text('SHIP TO', MARGIN, y, { characterSpacing: 1 })
  doc.font('Bold').fontSize(14).fillColor(INK).text(name ?? '', MARGIN, doc.y + 2, { width: toWidth })
  doc.font('Body').fontSize(12).text(rest.join('\n'), { width: toWidth })
  const toBottom = doc.y
  doc.font('Bold').fontSize(9).fillColor(GREY).text('RETURN IF UNDELIVERABLE', fromX, y, { width: fromWidth, characterSpacing: 1 })
  doc.font('Body').fontSize(10).fillColor(INK).text([slip.shop.name, ...slip.shop.addressLines, slip.shop.email].join('\n'), fromX, doc.y + 2, { width: fromWidth })
  y = Math.max(toBottom, doc.y) + 14

  // The banner and the cautions in large words.
  const formats = [...new Set(slip.lines.map(line => line.format))]
  const banner = 'FRAGILE · KEEP COOL'
  doc.rect(MARGIN, y, width, 44).fill(INK)
  doc.font('Bold').fontSize(26).fillColor('#ffffff').text(banner, MARGIN, y + 8, { width, align: 'center', characterSpacing: 2, lineBreak: false })
  y += 44 + 10
  for (const caution of slipCautions(formats)) {
    const headHeight = doc.font('Bold').fontSize(12.5).heightOfString(caution.head, { width: width - 18 })
    const textHeight = doc.font('Body').fontSize(10).heightOfString(caution.text, { width: width - 18 })
    room(headHeight + textHeight + 8)
    doc.rect(MARGIN, y + 3, 8, 8).fill(INK)
    doc.font('Bold').fontSize(12.5).fillColor(INK).text(caution.head, MARGIN + 18, y, { width: width - 18 })
    doc.font('Body').fontSize(10).fillColor(INK).text(caution.text, MARGIN + 18, doc.y, { width: width - 18 })
    y = doc.y + 6
  }
  y += 8

  // What is in the parcel.
  const qrSize = 68
  const columns = { item: width - 110 - 60 - 84 - qrSize - 8, format: 110, speed: 60, blank: 84 }
  const x = { item: MARGIN, format: MARGIN + columns.item, speed: MARGIN + columns.item + columns.format, blank: MARGIN + columns.item + columns.format + columns.speed, qr: MARGIN + width - qrSize }
  const tableHead = () => {
    doc.font('Bold').fontSize(9).fillColor(GREY)
    doc.text('IN THIS PARCEL', x.item, y, { width: columns.item, characterSpacing: 1 })
    doc.text('FORMAT', x.format, y, { width: columns.format, characterSpacing: 1 })
    doc.text('SPEED', x.speed, y, { width: columns.speed, characterSpacing: 1 })
    doc.text('BLANK', x.blank, y, { width: columns.blank, characterSpacing: 1 })
    doc.text('CERTIFICATE', x.qr - 8, y, { width: qrSize + 8, align: 'center', characterSpacing: 0.5 })
    y += 14
    doc.moveTo(MARGIN, y).lineTo(MARGIN + width, y).lineWidth(0.75).strokeColor(INK).stroke()
    y += 6
  }
  room(14 + 6 + qrSize + 10)
  tableHead()
  for (const line of slip.lines) {
    const title = line.quantity > 1 ? `${line.quantity} × ${line.title}` : line.title
    const note = line.unitNote ?? (line.blankCode ? null : 'from stock')
    const itemHeight = doc.font('Bold').fontSize(11).heightOfString(title, { width: columns.item - 8 })
      + (note ? 1 + doc.font('Body').fontSize(9).heightOfString(note, { width: columns.item - 8 }) : 0)
    const formatHeight = doc.font('Bold').fontSize(11).heightOfString(formatWords[line.format].short, { width: columns.format - 6 })
      + 1 + doc.font('Body').fontSize(9).heightOfString(formatWords[line.format].pitch, { width: columns.format - 6 })
    const rowHeight = Math.max(itemHeight, formatHeight, line.certificateUrl ? qrSize - 4 : 0)
    if (y + rowHeight + 8 > bottom) {
      newPage()
      tableHead()
    }
    doc.font('Bold').fontSize(11).fillColor(INK).text(title, x.item, y, { width: columns.item - 8 })
    if (note) doc.font('Body').fontSize(9).fillColor(GREY).text(note, x.item, doc.y + 1, { width: columns.item - 8 })
    doc.font('Bold').fontSize(11).fillColor(INK).text(formatWords[line.format].short, x.format, y, { width: columns.format - 6 })
    doc.font('Body').fontSize(9).fillColor(GREY).text(formatWords[line.format].pitch, x.format, doc.y + 1, { width: columns.format - 6 })
    doc.font('Bold').fontSize(11).fillColor(INK).text(`${line.rpm} rpm`, x.speed, y, { width: columns.speed - 6 })
    doc.font('Body').fontSize(10).fillColor(INK).text(line.blankCode ?? '—', x.blank, y, { width: columns.blank - 6 })
    if (line.certificateUrl) {
      const qr = await qrPng(line.certificateUrl)
      doc.image(qr.png, x.qr, y - 4, { width: qrSize, height: qrSize })
    }
    y += rowHeight + 4
    doc.moveTo(MARGIN, y).lineTo(MARGIN + width, y).lineWidth(0.4).strokeColor('#999999').stroke()
    y += 6
  }
  if (slip.lines.some(line => line.certificateUrl)) {
    const hint = 'Scan a cylinder\'s code for its test certificate: the blank it was cut on and how quiet its surface played.'
    room(30)
    doc.font('Body').fontSize(9).fillColor(GREY).text(hint, MARGIN, y, { width })
    y = doc.y + 10
  }

  // A short care note with the address of the care guide (and its code).
  const careQr = await qrPng(slip.careUrl)
  const careSize = 64
  const careText = 'Unpack on a table. Lift each cylinder by its ends, a finger inside the bore, never touching the grooves. '
    + 'Keep cylinders standing on end in their boxes, at a steady 65 to 70\u00A0°F (18 to 21\u00A0°C) and moderate humidity, away from sun and heaters.'
  const careWidth = width - careSize - 24
  const careTextHeight = doc.font('Bold').fontSize(12).heightOfString('Caring', { width: careWidth }) + 2
    + doc.font('Body').fontSize(10).heightOfString(careText, { width: careWidth }) + 4
    + doc.font('Bold').fontSize(10).heightOfString(`Care guide: ${slip.careUrl}`, { width: careWidth })
  const careHeight = Math.max(careSize, careTextHeight) + 16
  room(careHeight)
  doc.rect(MARGIN, y, width, careHeight).lineWidth(1).strokeColor(INK).stroke()
  doc.font('Bold').fontSize(12).fillColor(INK).text('Caring for your cylinders', MARGIN + 10, y + 8, { width: careWidth })
  doc.font('Body').fontSize(10).text(careText, MARGIN + 10, doc.y + 2, { width: careWidth })
  doc.font('Bold').fontSize(10).text(`Care guide: ${slip.careUrl}`, MARGIN + 10, doc.y + 4, { width: careWidth })
  doc.image(careQr.png, MARGIN + width - careSize - 8, y + (careHeight - careSize) / 2, { width: careSize, height: careSize })
  y += careHeight

  // Footers, once the number of pages is known.
  const range = doc.bufferedPageRange()
  for (let page = range.start; page < range.start + range.count; page++) {
    doc.switchToPage(page)
    doc.font('Body').fontSize(8).fillColor(GREY).text(
      `${slip.shop.name} · order ${slip.number} · page ${page + 1} of ${range.count} · ${slipPapers[paper].label}`,
      MARGIN, pageHeight - MARGIN - 10, { width, align: 'center', lineBreak: false },
    )
  }
  return await dispatchPdfBuffer(doc)
}
