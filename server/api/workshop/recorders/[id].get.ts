/** One recorder, its place in the ranking, and its test cuts over time (oldest first, for the chart). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const { id } = paramsWith(event, idParamsSchema)
  const db = await useDB()
  const recorder = await findRecorder(db, id).catch(() => {
    throw notFoundError('No such recorder.')
  })
  const ranking = await rankRecorders(db)
  const cuts = await recorderCutHistory(db, id)
  return {
    recorder,
    standing: ranking.find(row => row.id === id)!,
    rankedCount: ranking.filter(row => row.rank !== null).length,
    rule: recorderRankingRule,
    cuts: cuts.map(cut => ({ ...cut, fileUrl: cut.fileId ? storedFileUrl(cut.fileId) : null })),
  }
})
