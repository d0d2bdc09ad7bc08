/**
 * One reaming session, with the engine's plan from the reading before kept beside it. After shaving
 * has begun only a refit (`refit: true`) is taken: it spends the current surface (blankLifecycle.ts).
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const input = await readBodyWith(event, blankReamingSchema)
  const db = await useDB()
  const data = blankReamingRecord(input, await getSetting('engine', db))
  const result = await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    await assertBlankAction(tx, blank, input.refit ? 'refit' : 'ream')
    const entry = await writeBlankLog(tx, blank.id, 'reaming', data, maker.id)
    const updated = input.refit
      ? await changeBlank(tx, blank, { state: 'reamed', surfacesUsed: blank.surfacesUsed + 1 }, `refit: reamed after shaving, surface ${blankCurrentSurface(blank.surfacesUsed)} spent`, maker.id)
      : await changeBlank(tx, blank, { state: 'reamed' }, 'bore reamed', maker.id)
    return { updated, entry }
  })
  setResponseStatus(event, 201)
  return { code, state: result.updated.state, surfacesUsed: result.updated.surfacesUsed, reaming: { id: result.entry.id, at: result.entry.at, ...data } }
})
