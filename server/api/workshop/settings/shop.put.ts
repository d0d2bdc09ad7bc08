export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const input = await readBodyWith(event, shopProfileSchema)
  return await putSetting('shop', input, maker.id)
})
