import { and, eq, or, sql } from 'drizzle-orm'
import { files, products } from '../../db/schema'

const notFound = () => notFoundError('No such file.')

/** Whether a product the shop shows (not hidden) has this file among its photos or as its sample. */
async function shownInShop(db: Awaited<ReturnType<typeof useDB>>, id: string): Promise<boolean> {
  const [row] = await db.select({ id: products.id }).from(products).where(and(
    eq(products.hidden, false),
    or(eq(products.sampleFileId, id), sql`${products.photoFileIds} @> ${JSON.stringify([id])}::jsonb`),
  )).limit(1)
  return row !== undefined
}

/**
 * A stored file by its id. A public file (a product's photos and sample) goes to anyone while a product
 * in the shop shows it: once its product is hidden (or lets it go), only makers get it. The rest only to
 * makers; to everyone else the file does not exist. Audio is seekable: one byte range per request.
 */
export default defineEventHandler(async (event) => {
  const id = getRouterParam(event, 'id') ?? ''
  if (!fileIdPattern.test(id)) throw notFound()
  const db = await useDB()
  const [file] = await db.select().from(files).where(eq(files.id, id))
  if (!file) throw notFound()
  const forEveryone = file.isPublic && await shownInShop(db, id)
  if (!forEveryone && (await currentUser(event))?.role !== 'maker') throw notFound()

  // Bytes under an id never change, but a product can be hidden at any time: a cache may keep a file
  // and must ask again before each use (a 304 while it may still have it), so a hidden product's
  // photos and sample stop at once. A file only the maker sees stays out of shared caches.
  return sendStoredFile(event, file, { shared: forEveryone })
})
