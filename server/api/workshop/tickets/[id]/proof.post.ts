/**
 * POST /api/workshop/tickets/{id}/proof (maker; multipart `file` WAV or MP3, optional `note`) → 201:
 * the proof of a cut personal message goes to the customer (ticket proof_sent, order proof_pending).
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  return await uploadProof(event, id, maker.id)
})
