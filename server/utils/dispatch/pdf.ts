import PDFDocument from 'pdfkit'
import bwipjs from 'bwip-js/node'
import QRCode from 'qrcode'
import type { ShippingAddress } from '../../db/schema'
import { countryName } from '../../../shared/utils/addressPlace'

/*
 * Drawing helpers the packing slip and the address label share: the fonts shipped with the app
 * (DejaVu Sans, server/assets/fonts, bundled into the server's output as server assets, so nothing
 * is read from the machine's own font folders), a document collected into one buffer, the order's
 * Code 128 barcode and QR codes as PNG.
 */

export interface DispatchPdfFonts { regular: Buffer, bold: Buffer }

let fontsLoading: Promise<DispatchPdfFonts> | undefined

async function readFontAsset(name: string): Promise<Buffer> {
  const raw = await useStorage('assets:server').getItemRaw(`fonts/${name}`)
  if (!raw) throw new Error(`The font ${name} is missing from the server assets (server/assets/fonts)`)
  return Buffer.from(raw as Uint8Array)
}

/** The slip's fonts, read once per process from the bundled server assets. */
export function dispatchPdfFonts(): Promise<DispatchPdfFonts> {
  fontsLoading ??= Promise.all([readFontAsset('DejaVuSans.ttf'), readFontAsset('DejaVuSans-Bold.ttf')])
    .then(([regular, bold]) => ({ regular, bold }))
    .catch((error) => {
      fontsLoading = undefined
      throw error
    })
  return fontsLoading
}

/** A new PDF page set in the shop's fonts ('Body' and 'Bold'); margins are drawn by hand. */
export function newDispatchPdf(size: [number, number], fonts: DispatchPdfFonts, title: string) {
  const doc = new PDFDocument({ size, margin: 0, bufferPages: true, font: fonts.regular as unknown as string, info: { Title: title, Creator: 'Groovewright' } })
  doc.registerFont('Body', fonts.regular)
  doc.registerFont('Bold', fonts.bold)
  doc.font('Body')
  return doc
}

/** The finished document as one buffer. */
export function dispatchPdfBuffer(doc: PDFKit.PDFDocument): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    doc.on('data', (chunk: Buffer) => chunks.push(chunk))
    doc.on('end', () => resolve(Buffer.concat(chunks)))
    doc.on('error', reject)
    doc.end()
  })
}

/** Pixels per bar module in the barcode PNG. */
const BARCODE_SCALE = 4

/** A Code 128 barcode of `text` as PNG (bars only, no quiet zone: the drawing leaves it), with its width in modules. */
export async function code128Png(text: string) {
  const png = await bwipjs.toBuffer({ bcid: 'code128', text, scale: BARCODE_SCALE, height: 10, includetext: false, paddingwidth: 0, paddingheight: 0 })
  return { png, modules: pngSize(png).widthPx / BARCODE_SCALE }
}

/** A QR code of `text` as PNG (medium error correction, the standard four-module quiet zone). */
export async function qrPng(text: string) {
  const png = await QRCode.toBuffer(text, { type: 'png', errorCorrectionLevel: 'M', margin: 4, scale: 8 })
  return { png, ...pngSize(png) }
}

function pngSize(png: Buffer) {
  // IHDR: width and height are the big-endian words at bytes 16 and 20.
  return { widthPx: png.readUInt32BE(16), heightPx: png.readUInt32BE(20) }
}

export type Code128 = Awaited<ReturnType<typeof code128Png>>

/** Width in points of the barcode at `modulePt` points per bar module. */
export const code128Width = (barcode: Code128, modulePt: number) => barcode.modules * modulePt

/**
 * The barcode drawn at (x, y), `modulePt` points per module (0.33 mm and up reads well on any scanner)
 * and `height` points tall. Keep 10 modules clear on either side: the quiet zone scanners need.
 */
export function drawCode128(doc: PDFKit.PDFDocument, barcode: Code128, x: number, y: number, modulePt: number, height: number) {
  doc.image(barcode.png, x, y, { width: code128Width(barcode, modulePt), height })
}

/** An address as the lines a carrier reads, top to bottom. */
export function parcelAddressLines(address: ShippingAddress): string[] {
  const town = [address.city, address.region].filter(Boolean).join(', ')
  return [address.name, address.line1, address.line2, town, address.postalCode, countryName(address.country)]
    .map(line => (line ?? '').trim()).filter(Boolean)
}
