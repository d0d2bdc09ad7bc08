/** An audio sample (WAV, MP3 or Ogg by its bytes, ≤ 30 MB), kept as sent; private until a product uses it. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  return await receiveUpload(event, 'audio', maker.id)
})
