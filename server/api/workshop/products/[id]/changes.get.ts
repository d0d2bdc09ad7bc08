import { desc, eq } from 'drizzle-orm'
import { productChanges, products, users } from '../../../../db/schema'

/** The product's change log, newest first: who changed price, stock or visibility, when, from what to what. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const db = await useDB()
  const [product] = await db.select({ id: products.id }).from(products).where(eq(products.id, id))
  if (!product) throw notFoundError('No such product in the catalogue.')
  return await db.select({
    id: productChanges.id,
    field: productChanges.field,
    oldValue: productChanges.oldValue,
    newValue: productChanges.newValue,
    at: productChanges.at,
    userId: productChanges.userId,
    userName: users.name,
  }).from(productChanges)
    .leftJoin(users, eq(users.id, productChanges.userId))
    .where(eq(productChanges.productId, id))
    .orderBy(desc(productChanges.at), desc(productChanges.id))
})
