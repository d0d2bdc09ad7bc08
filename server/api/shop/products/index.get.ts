export default defineEventHandler(async (event) => {
  const query = queryWith(event, catalogueQuerySchema)
  return await searchCatalogue(await useDB(), query)
})
