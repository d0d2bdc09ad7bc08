import { and, asc, eq, sql } from 'drizzle-orm'
import { products } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

type Db = Database | Transaction

/** Orders whose blank units are promised but not yet tied to a register blank (packing ties them). */
export const blankPromisingStatuses = ['awaiting_payment', 'paid', 'in_production', 'proof_pending', 'ready_to_pack'] as const

/** One pool of blanks: a format and a wax formula, with what it holds for sale. */
export interface BlankPool {
  format: BlankRow['format']
  waxFormulaId: string
  /** Free register blanks whose current surface passed a fresh test. */
  free: number
  /** Units of register-counted blank products promised to open orders, not yet tied to a blank. */
  promised: number
  /** What a blank product of this pool may sell now: free − promised, never below 0. */
  stock: number
}

async function poolSettings(db: Db) {
  const { defaultId } = await shopWaxFormulas(db)
  const { passMaxAgeDays } = await getSetting('surface', db)
  return { defaultId, freshSince: new Date(Date.now() - passMaxAgeDays * 86_400_000) }
}

/**
 * The register's pools, as one query: per format and wax formula, the free passed blanks (the rule the
 * ticket's blank picker offers by: state tested_pass, the latest test of the current surface a pass no
 * older than the shop's passMaxAgeDays, no open ticket holding it, not tied to an order) and the units
 * promised to open orders (quantity less units already tied and units a refund puts back). A
 * batch or product without a formula counts as the shop's first.
 */
function poolsQuery(defaultId: string, freshSince: Date) {
  const statuses = sql.join(blankPromisingStatuses.map(status => sql`${status}`), sql`, `)
  return sql`
    with free as (
      select b.format, coalesce(wb.wax_formula_id, ${defaultId}) as formula, count(*)::int as n
      from blanks b
      join wax_batches wb on wb.id = b.batch_id
      join lateral (
        select st.final_verdict, st.tested_at from surface_tests st
        where st.blank_id = b.id and st.surface = b.surfaces_used + 1
        order by st.tested_at desc, st.id desc limit 1
      ) latest on true
      where b.state = 'tested_pass' and latest.final_verdict = 'pass' and latest.tested_at >= ${freshSince.toISOString()}::timestamptz
        and not exists (select 1 from tickets t where t.blank_id = b.id and t.stage <> 'done')
        and not exists (select 1 from order_item_blanks ob where ob.blank_id = b.id)
      group by 1, 2
    ), promised as (
      select p.format, coalesce(p.wax_formula_id, ${defaultId}) as formula,
        sum(greatest(0, oi.quantity
          - (select count(*) from order_item_blanks ob where ob.order_item_id = oi.id)
          - coalesce((select sum(ri.quantity) from refund_items ri join refunds r on r.id = ri.refund_id
              where ri.order_item_id = oi.id and r.status <> 'failed'), 0)))::int as n
      from order_items oi
      join orders o on o.id = oi.order_id
      join products p on p.id = oi.product_id
      where p.kind = 'blank' and p.stock_source = 'register' and o.stock_released_at is null
        and o.status in (${statuses})
      group by 1, 2
    )
    select coalesce(free.format, promised.format)::text as format, coalesce(free.formula, promised.formula) as formula,
      coalesce(free.n, 0)::int as free, coalesce(promised.n, 0)::int as promised
    from free full outer join promised on promised.format = free.format and promised.formula = free.formula`
}

interface PoolRow { format: string, formula: string, free: number, promised: number }

/** Every pool of the register that holds or owes anything. */
export async function registerBlankPools(db: Db): Promise<BlankPool[]> {
  const { defaultId, freshSince } = await poolSettings(db)
  // Both drivers answer a raw query with its rows under `rows`.
  const result = await db.execute(poolsQuery(defaultId, freshSince))
  return (result as unknown as { rows: PoolRow[] }).rows.map(row => ({
    format: row.format as BlankPool['format'],
    waxFormulaId: row.formula,
    free: Number(row.free),
    promised: Number(row.promised),
    stock: Math.max(0, Number(row.free) - Number(row.promised)),
  }))
}

/** The pool a blank product draws from (an empty one when the register has none of its kind). */
export async function registerPoolOf(db: Db, product: Pick<ProductRow, 'format' | 'waxFormulaId'>): Promise<BlankPool> {
  const waxFormulaId = product.waxFormulaId ?? (await shopWaxFormulas(db)).defaultId
  const pools = await registerBlankPools(db)
  return pools.find(pool => pool.format === product.format && pool.waxFormulaId === waxFormulaId)
    ?? { format: product.format, waxFormulaId, free: 0, promised: 0, stock: 0 }
}

/**
 * Sets the stock of every blank product counted from the register to its pool's figure, inside the
 * caller's transaction: called whenever the register changes (a blank moves, a test is stored), when an
 * order's stock comes back and by the minute sweep (a pass goes stale with time). The products are locked
 * first, in id order as checkout takes them, so a checkout's conditional decrement and this count queue
 * rather than interleave: the count, a new statement, sees the order a checkout just committed.
 */
export async function refreshBlankStock(tx: Db): Promise<number> {
  const counted = await tx.select({ id: products.id, format: products.format, waxFormulaId: products.waxFormulaId, stock: products.stock }).from(products)
    .where(and(eq(products.kind, 'blank'), eq(products.stockSource, 'register'))).orderBy(asc(products.id)).for('update')
  if (counted.length === 0) return 0
  const pools = await registerBlankPools(tx)
  const { defaultId } = await shopWaxFormulas(tx)
  let changed = 0
  for (const product of counted) {
    const formula = product.waxFormulaId ?? defaultId
    const stock = pools.find(pool => pool.format === product.format && pool.waxFormulaId === formula)?.stock ?? 0
    if (stock === product.stock) continue
    await tx.update(products).set({ stock }).where(eq(products.id, product.id))
    changed++
  }
  return changed
}

/** For the catalogue form: where a blank product's stock comes from, and how far the typed count is from the register's. */
export async function blankStockView(db: Db, product: Pick<ProductRow, 'kind' | 'format' | 'waxFormulaId' | 'stock' | 'stockSource'>) {
  if (product.kind !== 'blank') return null
  const pool = await registerPoolOf(db, product)
  return { source: product.stockSource, register: pool.stock, free: pool.free, promised: pool.promised, difference: product.stock - pool.stock }
}

/** The product row after the register's blank stock is counted again (for a product just written). */
export async function productAfterRegisterCount(tx: Transaction, productId: number): Promise<ProductRow> {
  await refreshBlankStock(tx)
  const [row] = await tx.select().from(products).where(eq(products.id, productId))
  return row!
}
