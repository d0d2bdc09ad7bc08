import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction

/** The shop's wax formulas (Workshop figures), and the one an item or batch without its own counts as: the first. */
export async function shopWaxFormulas(db: Db) {
  const list = (await getSetting('engine', db)).fit.waxFormulas
  const label = (id: string | null | undefined) => list.find(formula => formula.id === id)?.label ?? id ?? 'unknown'
  return { list, defaultId: list[0]!.id, label }
}

/** A 400 naming `waxFormulaId` when the id is not one of the shop's formulas (null and left out pass). */
export async function checkWaxFormulaId(db: Db, waxFormulaId: string | null | undefined) {
  if (!waxFormulaId) return
  const { list } = await shopWaxFormulas(db)
  if (!list.some(formula => formula.id === waxFormulaId)) {
    throw fieldError('waxFormulaId', `not one of the shop's wax formulas (${list.map(formula => formula.id).join(', ')})`)
  }
}
