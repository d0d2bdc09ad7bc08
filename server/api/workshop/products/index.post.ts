import { eq } from 'drizzle-orm'
import { productChanges, products } from '../../../db/schema'

export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const input = await readBodyWith(event, productCreateSchema)
  const db = await useDB()
  await checkWaxFormulaId(db, input.waxFormulaId)
  const created = await db.transaction(async (tx) => {
    const [taken] = await tx.select({ id: products.id }).from(products).where(eq(products.slug, input.slug)).limit(1)
    if (taken) throw slugTaken(input.slug)
    await publishProductFiles(tx, input.photoFileIds, input.sampleFileId)
    const [inserted] = await tx.insert(products).values(input).returning()
    // A blank counted from the register takes its pool's count at once, whatever stock was sent.
    const row = inserted!.kind === 'blank' && inserted!.stockSource === 'register' ? await productAfterRegisterCount(tx, inserted!.id) : inserted!
    // The first price and stock open the change log, so every later change has something to follow.
    await tx.insert(productChanges).values([
      { productId: row.id, userId: maker.id, field: 'priceMinor', oldValue: null, newValue: String(row.priceMinor) },
      { productId: row.id, userId: maker.id, field: 'stock', oldValue: null, newValue: String(row.stock) },
    ])
    return row
  })
  setResponseStatus(event, 201)
  return created
})

function slugTaken(slug: string) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', message: `slug: "${slug}" is already used by another product.`, data: { fields: { slug: 'already used by another product' } } })
}
