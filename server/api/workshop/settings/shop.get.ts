export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  return await getSetting('shop')
})
