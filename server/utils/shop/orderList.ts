import { and, asc, count, desc, eq, ilike, or, sql, type SQL } from 'drizzle-orm'
import { z } from 'zod'
import { orders } from '../../db/schema'
import type { Database } from '../platform/db'

export const orderListQuerySchema = z.object({
  status: z.enum(orders.status.enumValues, { error: `status must be one of ${orders.status.enumValues.join(', ')}` }).optional(),
  q: z.string().trim().max(100, 'q is too long').optional(),
  sort: z.enum(['newest', 'oldest', 'total_desc', 'total_asc'], { error: 'sort must be newest, oldest, total_desc or total_asc' }).default('newest'),
  page: z.coerce.number({ error: 'page must be a number' }).int().min(1, 'page must be at least 1').max(10_000).default(1),
  pageSize: z.coerce.number({ error: 'pageSize must be a number' }).int().min(1).max(200, 'pageSize must be at most 200').default(25),
})

export type OrderListQuery = z.infer<typeof orderListQuerySchema>

const orderings = {
  newest: [desc(orders.createdAt), desc(orders.id)],
  oldest: [asc(orders.createdAt), asc(orders.id)],
  total_desc: [desc(orders.totalMinor), desc(orders.id)],
  total_asc: [asc(orders.totalMinor), asc(orders.id)],
}

/** The maker's order table: filter by state, search number/e-mail/name, sort, page. */
export async function listOrders(db: Database, query: OrderListQuery, limit?: number) {
  const filters: SQL[] = []
  if (query.status) filters.push(eq(orders.status, query.status))
  if (query.q) {
    const pattern = containsPattern(query.q)
    filters.push(or(ilike(orders.number, pattern), ilike(orders.email, pattern), ilike(sql`${orders.shippingAddress}->>'name'`, pattern))!)
  }
  const where = filters.length ? and(...filters) : undefined
  const pageSize = limit ?? query.pageSize
  const rows = await db.select().from(orders).where(where).orderBy(...orderings[query.sort])
    .limit(pageSize).offset(limit ? 0 : (query.page - 1) * pageSize)
  const [total] = await db.select({ n: count() }).from(orders).where(where)
  return {
    total: total?.n ?? 0,
    page: query.page,
    pageSize,
    rows: rows.map(order => ({
      number: order.number,
      status: order.status,
      email: order.email,
      name: order.shippingAddress.name,
      createdAt: order.createdAt,
      currency: order.currency,
      totalMinor: order.totalMinor,
      refundedMinor: order.refundedMinor,
    })),
  }
}
