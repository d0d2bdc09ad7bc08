export default defineEventHandler(async (event) => {
  return await requireRole(event)
})
