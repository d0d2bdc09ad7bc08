/** The recorders, ranked by their recent test cuts (the rule comes with the answer, to show beside it). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const ranking = await rankRecorders(await useDB())
  return { rule: recorderRankingRule, recorders: ranking, suggested: suggestedRecorder(ranking) }
})
