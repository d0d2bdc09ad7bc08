// The catalogue is the same for everyone: kept until a product or a setting changes (catalogueCache.ts).
export default defineEventHandler(async (event) => {
  const query = queryWith(event, catalogueQuerySchema)
  return await cachedCatalogueAnswer(`list:${JSON.stringify(query)}`, db => searchCatalogue(db, query))
})
