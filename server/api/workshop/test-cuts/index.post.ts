/**
 * A test cut: a short recording cut with one recorder (multipart: `file`, `recorderId`, and
 * optionally `blankCode`, `notes`, `rpm`, `cutAt`), analysed like a surface test and kept with its notes.
 * Made on a named blank, it uses that blank's current surface: only a shaved or tested blank no open
 * ticket holds may take one, and the blank goes to `cut` (see `blankForTestCut`).
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { fields, file } = await readUploadForm(event, 'audio')
  const parsed = testCutFieldsSchema.safeParse(fields)
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!
    throw fieldError(issue.path.map(String).join('.') || 'body', issue.message)
  }
  if (!file) throw fieldError('file', 'choose the recording of the test cut (a WAV file)')
  const input = parsed.data
  const db = await useDB()
  const recorder = await findRecorder(db, input.recorderId)
  // Checked before the analysis too, so a refused blank costs no work; the locked check below decides.
  if (input.blankCode) await blankForTestCut(db, input.blankCode)
  const analysis = await analyseTestCut(file.data, input.rpm, await testCutThresholds(db))
  const cut = await db.transaction(async (tx) => {
    const blank = input.blankCode ? await blankForTestCut(tx, input.blankCode, true) : null
    const stored = await storeTestCut(tx, {
      bytes: file.data, name: fileLabel(file.filename, 'test-cut.wav'), analysis, recorderId: recorder.id, blankId: blank?.id ?? null, notes: input.notes,
      cutAt: input.cutAt ? new Date(input.cutAt) : undefined, userId: maker.id,
    })
    if (blank) await markBlankTestCut(tx, blank, { id: stored.id, recorderName: recorder.name }, maker.id)
    return stored
  })
  setResponseStatus(event, 201)
  return {
    id: cut.id,
    recorderId: recorder.id,
    recorderName: recorder.name,
    blankCode: input.blankCode ?? null,
    blankState: input.blankCode ? 'cut' as const : null,
    cutAt: cut.cutAt,
    aWeightedDbfs: cut.aWeightedDbfs,
    clicksPerMinute: cut.clicksPerMinute,
    rotaryDb: analysis.rotaryDb,
    verdict: cut.verdict,
    reasons: analysis.reasons,
    fileUrl: cut.fileId ? storedFileUrl(cut.fileId) : null,
  }
})
