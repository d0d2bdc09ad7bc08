/**
 * A test cut: a short recording cut with one recorder (multipart: `file`, `recorderId`, and
 * optionally `blankCode`, `notes`, `rpm`, `cutAt`), analysed like a surface test and kept with its notes.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { fields, file } = await readTestCutUpload(event)
  const parsed = testCutFieldsSchema.safeParse(fields)
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!
    throw fieldError(issue.path.map(String).join('.') || 'body', issue.message)
  }
  if (!file) throw fieldError('file', 'choose the recording of the test cut (a WAV file)')
  const input = parsed.data
  const db = await useDB()
  const recorder = await findRecorder(db, input.recorderId)
  const blankId = input.blankCode ? await findBlankIdByCode(db, input.blankCode) : null
  const analysis = analyseTestCut(file.bytes, input.rpm, await testCutThresholds(db))
  const cut = await db.transaction(tx => storeTestCut(tx, {
    bytes: file.bytes, name: file.name, analysis, recorderId: recorder.id, blankId, notes: input.notes,
    cutAt: input.cutAt ? new Date(input.cutAt) : undefined, userId: maker.id,
  }))
  setResponseStatus(event, 201)
  return {
    id: cut.id,
    recorderId: recorder.id,
    recorderName: recorder.name,
    blankCode: input.blankCode ?? null,
    cutAt: cut.cutAt,
    aWeightedDbfs: cut.aWeightedDbfs,
    clicksPerMinute: cut.clicksPerMinute,
    rotaryDb: analysis.rotaryDb,
    verdict: cut.verdict,
    reasons: analysis.reasons,
    fileUrl: cut.fileId ? storedFileUrl(cut.fileId) : null,
  }
})
