import { and, asc, eq } from 'drizzle-orm'
import { blanks, orderItemBlanks, orderItems, products } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction

/**
 * At packing, each unit of a blank product counted from the register is tied to one specific free blank
 * of its format and wax that passed its surface test (reserved now, shipped with the parcel). Units a
 * refund put back and units tied before (a replacement packed again) are left alone. When the register
 * has too few, the packing is refused with a 409 naming the product, its format and wax.
 */
export async function tieOrderBlanks(tx: Transaction, order: { id: number, number: string }, userId: number): Promise<Map<number, string[]>> {
  const items = await tx.select({ id: orderItems.id, title: orderItems.title, quantity: orderItems.quantity, format: orderItems.format, waxFormulaId: products.waxFormulaId, stockSource: products.stockSource })
    .from(orderItems).innerJoin(products, eq(products.id, orderItems.productId))
    .where(and(eq(orderItems.orderId, order.id), eq(orderItems.kind, 'blank'))).orderBy(asc(orderItems.id))
  const counted = items.filter(item => item.stockSource === 'register')
  const tiedCodes = new Map<number, string[]>()
  if (counted.length === 0) return tiedCodes
  const returned = await returnedCounts(tx, order.id)
  const already = await tx.select({ orderItemId: orderItemBlanks.orderItemId, unit: orderItemBlanks.unit }).from(orderItemBlanks).where(eq(orderItemBlanks.orderId, order.id))
  const wax = await shopWaxFormulas(tx)
  for (const item of counted) {
    const taken = new Set(already.filter(row => row.orderItemId === item.id).map(row => row.unit))
    const going = item.quantity - (returned.get(item.id) ?? 0)
    const units = Array.from({ length: Math.max(0, going) }, (_, index) => index + 1).filter(unit => !taken.has(unit))
    if (units.length === 0) continue
    const waxFormulaId = item.waxFormulaId ?? wax.defaultId
    const outcome = await reserveBlanksForItem(tx, { orderId: order.id, orderItemId: item.id, units, format: item.format, waxFormulaId, orderNumber: order.number }, userId)
    if ('missing' in outcome) {
      throw conflictError(
        `Order ${order.number} cannot be packed: the register has ${outcome.missing === units.length ? 'no' : `only ${units.length - outcome.missing}`} free ${blankFormatLabels[item.format]} blank${units.length === 1 ? '' : 's'} of ${wax.label(waxFormulaId)} wax that passed a fresh surface test for “${item.title}” (${units.length} needed). Test or free one in the register first.`,
        { product: item.title, format: item.format, waxFormulaId, missing: outcome.missing },
      )
    }
    tiedCodes.set(item.id, outcome.codes)
  }
  return tiedCodes
}

/** The blanks tied to an order's units, by order item: codes in unit order. */
export async function orderBlankCodes(db: Db, orderId: number): Promise<Map<number, string[]>> {
  const rows = await db.select({ orderItemId: orderItemBlanks.orderItemId, code: blanks.code })
    .from(orderItemBlanks).innerJoin(blanks, eq(blanks.id, orderItemBlanks.blankId))
    .where(eq(orderItemBlanks.orderId, orderId)).orderBy(asc(orderItemBlanks.orderItemId), asc(orderItemBlanks.unit))
  const codes = new Map<number, string[]>()
  for (const row of rows) codes.set(row.orderItemId, [...(codes.get(row.orderItemId) ?? []), row.code])
  return codes
}
