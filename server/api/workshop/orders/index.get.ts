export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const query = queryWith(event, orderListQuerySchema)
  return await listOrders(await useDB(), query)
})
