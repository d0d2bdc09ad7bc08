/**
 * POST /api/custom/voice (anyone; multipart `file`) → 201 { id, seconds, mime, bytes }: the customer's
 * own recording for a personal message, checked by content and measured. Private; one checkout links it.
 */
export default defineEventHandler(async (event) => {
  const user = await currentUser(event)
  return await receiveVoiceUpload(event, user?.id ?? null)
})
