import { and, eq, ne } from 'drizzle-orm'
import { productChanges, products } from '../../../../db/schema'

/**
 * Edits a product. Price, stock and visibility changes are logged (who, when, old → new) in the same
 * transaction. Stock is set as an absolute count, but against the row locked for update, and when the
 * form says which stock it showed (`stockSeen`), a count that moved meanwhile (a sale) is not overwritten.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const { stockSeen, ...changes } = await readBodyWith(event, productPatchSchema)
  const db = await useDB()
  await checkWaxFormulaId(db, changes.waxFormulaId)
  return await db.transaction(async (tx) => {
    const [current] = await tx.select().from(products).where(eq(products.id, id)).for('update')
    if (!current || current.kind === 'custom') throw notFoundError('No such product in the catalogue.')
    if (changes.stock !== undefined && stockSeen !== undefined && stockSeen !== current.stock) {
      throw createError({
        statusCode: 409,
        statusMessage: 'Conflict',
        message: `stock: the stock changed from ${stockSeen} to ${current.stock} while you were editing (an order or another maker). Check the count and save again.`,
        data: { fields: { stock: `now ${current.stock}; it was ${stockSeen} when you opened the form` }, current: { stock: current.stock } },
      })
    }
    const merged = { ...current, ...changes, kind: changes.kind ?? current.kind } as ProductFields
    if (changes.stock !== undefined && merged.kind === 'blank' && merged.stockSource === 'register') {
      throw fieldError('stock', 'this blank\'s stock is counted from the register; choose a manual count (stockSource) to type one')
    }
    const problems = productRuleProblems(merged)
    if (Object.keys(problems).length > 0) {
      throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: Object.values(problems).join('; '), data: { fields: problems } })
    }
    if (changes.slug && changes.slug !== current.slug) {
      const [taken] = await tx.select({ id: products.id }).from(products).where(and(eq(products.slug, changes.slug), ne(products.id, id))).limit(1)
      if (taken) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `slug: "${changes.slug}" is already used by another product.`, data: { fields: { slug: 'already used by another product' } } })
    }
    await publishProductFiles(tx, changes.photoFileIds, changes.sampleFileId)
    const [written] = await tx.update(products).set({ ...changes, updatedAt: new Date() }).where(eq(products.id, id)).returning()
    const updated = written!.kind === 'blank' && written!.stockSource === 'register' ? await productAfterRegisterCount(tx, id) : written
    const logged = loggedProductFields
      .filter(field => updated![field] !== current[field])
      .map(field => ({ productId: id, userId: maker.id, field, oldValue: String(current[field]), newValue: String(updated![field]) }))
    if (logged.length > 0) await tx.insert(productChanges).values(logged)
    return updated!
  })
})
