/** A catalogue photo (JPEG, PNG or WebP by its bytes, ≤ 8 MB), re-encoded; private until a product uses it. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  return await receiveUpload(event, 'photo', maker.id)
})
