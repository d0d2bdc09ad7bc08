/**
 * A new surface: the blank goes back to `shaved` with one more surface used. Taken from a failed
 * surface, or from a shaved, passed or cut one no ticket holds; refused below the shop's minimum
 * diameter. The request names the surface it leaves (`surface`); when the blank is no longer on it
 * (a double click, a retry after a lost answer, another maker first) the answer is 409 and nothing changes.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const input = await readBodyWith(event, blankReshaveSchema)
  const db = await useDB()
  const { minimumDiameterIn, depthPerSurfaceIn } = (await getSetting('engine', db)).shaving
  const result = await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    const current = blankCurrentSurface(blank.surfacesUsed)
    if (input.surface !== current) {
      throw createError({
        statusCode: 409,
        statusMessage: 'Conflict',
        message: input.surface < current
          ? `${code}: surface ${input.surface} is already spent; the blank is on surface ${current} now (${blankStateLabels[blank.state].toLowerCase()}). Nothing was changed.`
          : `${code}: the blank is on surface ${current}, not ${input.surface}. Nothing was changed.`,
        data: { state: blank.state, currentSurface: current },
      })
    }
    await assertBlankAction(tx, blank, 'reshave')
    const tooThin = (what: string) => createError({ statusCode: 409, statusMessage: 'Conflict', message: `${code}: ${what} under the shop's minimum diameter of ${formatInches(minimumDiameterIn)} in: scrap the blank instead of reshaving it.` })
    if (input.diameterAfterIn !== undefined) {
      if (blank.diameterIn !== null && input.diameterAfterIn > blank.diameterIn + 1e-6) throw fieldError('diameterAfterIn', `shaving takes wax off: the diameter after cannot be more than now (${formatInches(blank.diameterIn)} in)`)
      if (input.diameterAfterIn < minimumDiameterIn - 1e-9) throw tooThin(`${formatInches(input.diameterAfterIn)} in is`)
    }
    else if (blankSurfacesLeft(blank.diameterIn, minimumDiameterIn, depthPerSurfaceIn).surfacesLeft === 0) {
      throw tooThin(`another surface would take it`)
    }
    const surfaceBefore = current
    const data: BlankReshaveLogData = {
      fromState: blank.state,
      surfaceBefore,
      surfaceNow: surfaceBefore + 1,
      diameterBeforeIn: blank.diameterIn,
      diameterAfterIn: input.diameterAfterIn ?? null,
      wheelDegrees: input.wheelDegrees ?? null,
      passes: input.passes ?? null,
      reason: input.reason,
    }
    const entry = await writeBlankLog(tx, blank.id, 'reshave', data, maker.id)
    const updated = await changeBlank(tx, blank, { state: 'shaved', surfacesUsed: blank.surfacesUsed + 1, diameterIn: input.diameterAfterIn ?? blank.diameterIn }, `reshaved: surface ${surfaceBefore} spent, surface ${surfaceBefore + 1} cut`, maker.id)
    return { updated, entry, data }
  })
  setResponseStatus(event, 201)
  return { code, state: result.updated.state, surfacesUsed: result.updated.surfacesUsed, reshave: { id: result.entry.id, at: result.entry.at, ...result.data } }
})
