import { MIN_ROTATIONS_FOR_ROTARY } from '../../../../../audio'
/**
 * A surface test of the blank's current surface: the play-through WAV (multipart `file`) is analysed
 * against the shop's `surface` limits and stored with the figures, the file, who and when. The final
 * verdict follows the computed one (marginal passes) unless the maker overrules it with a reason.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const db = await useDB()
  // Refuse before reading a large upload when no test can be taken now; checked again when stored.
  const found = await findBlankByCode(db, code)
  await assertBlankAction(db, found, 'surfaceTest')
  const upload = await readUploadForm(event, 'surface_test', { required: 'choose the WAV file of the play-through' })
  const file = upload.file!
  const fields = surfaceFieldsWith(upload.fields, surfaceTestUploadFieldsSchema)
  const thresholds = await getSetting('surface', db)
  // A take shorter than the shop's share of the surface's playing time is stored as incomplete.
  const analysis = judgeSurfaceCoverage(await analyseSurfaceUpload(event, file.data, { rpm: fields.rpm, thresholds }), found.format, fields.rpm, await getSetting('engine', db), thresholds)
  if (analysis.rotaryDb === null) {
    const seconds = Math.ceil((MIN_ROTATIONS_FOR_ROTARY * 60) / fields.rpm) + 1
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: `file: the recording is ${analysis.durationS.toFixed(1)} s long, too short to judge once-per-turn noise; record at least ${seconds} s of the play-through.`, data: { fields: { file: `record at least ${seconds} s` } } })
  }
  if (analysis.verdict === 'incomplete' && fields.finalVerdict) throw fieldError('finalVerdict', `an incomplete play-through cannot be overruled: ${analysis.reasons[0]}`)
  const finalVerdict = fields.finalVerdict ?? storedVerdictWithoutOverrule(analysis.verdict)
  const overruled = analysis.verdict !== 'incomplete' && isSurfaceOverrule(analysis.verdict, finalVerdict as 'pass' | 'fail')
  if (overruled && !fields.overruleReason) throw fieldError('overruleReason', SURFACE_OVERRULE_REASON_REQUIRED)

  const test = await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    await assertBlankAction(tx, blank, 'surfaceTest')
    return await recordBlankSurfaceTest(tx, blank, {
      bytes: file.data,
      fileName: file.filename,
      rpm: fields.rpm,
      analysis,
      finalVerdict,
      overruleReason: fields.overruleReason ?? null,
      listeningNotes: fields.listeningNotes,
      byUserId: maker.id,
    })
  })
  setResponseStatus(event, 201)
  return surfaceTestView(test, maker.name, thresholds.passMaxAgeDays)
})
