/**
 * A shaving session on the blank's new surface: wheel setting, passes, diameter after; the engine's
 * shaving plan from the diameter before is kept beside it. Takes a reamed blank to `shaved`.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const input = await readBodyWith(event, blankShavingSchema)
  const db = await useDB()
  const settings = await getSetting('engine', db)
  const result = await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    await assertBlankAction(tx, blank, 'shave')
    const before = input.diameterBeforeIn ?? blank.diameterIn
    if (before === null) throw fieldError('diameterBeforeIn', 'the register has no diameter for this blank yet: give the largest diameter read before shaving')
    if (input.lowDiameterIn !== undefined && input.lowDiameterIn > before) throw fieldError('lowDiameterIn', `the smallest diameter read cannot be more than the largest (${formatInches(before)} in)`)
    if (input.diameterAfterIn > before + 1e-6) throw fieldError('diameterAfterIn', `shaving takes wax off: the diameter after cannot be more than before (${formatInches(before)} in)`)
    const data = blankShavingRecord({
      surface: blankCurrentSurface(blank.surfacesUsed),
      diameterBeforeIn: before,
      lowDiameterIn: input.lowDiameterIn ?? null,
      wheelDegrees: input.wheelDegrees,
      passes: input.passes,
      diameterAfterIn: input.diameterAfterIn,
      notes: input.notes,
    }, settings)
    const entry = await writeBlankLog(tx, blank.id, 'shaving', data, maker.id)
    const updated = await changeBlank(tx, blank, { state: 'shaved', diameterIn: input.diameterAfterIn }, `surface ${data.surface} shaved`, maker.id)
    return { updated, entry, data }
  })
  setResponseStatus(event, 201)
  return { code, state: result.updated.state, diameterIn: result.updated.diameterIn, shaving: { id: result.entry.id, at: result.entry.at, ...result.data } }
})
