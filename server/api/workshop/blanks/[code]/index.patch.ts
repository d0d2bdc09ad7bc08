/** Where the blank is, notes about it, or a corrected diameter; each change is logged. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const patch = await readBodyWith(event, blankPatchSchema)
  const db = await useDB()
  return await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    const changes: Record<string, { from: unknown, to: unknown }> = {}
    for (const field of ['location', 'notes', 'diameterIn'] as const) {
      if (patch[field] !== undefined && patch[field] !== blank[field]) changes[field] = { from: blank[field], to: patch[field] }
    }
    if (Object.keys(changes).length === 0) return { code: blank.code, changed: [] as string[] }
    await changeBlank(tx, blank, patch, 'edited', maker.id)
    await writeBlankLog(tx, blank.id, 'note', { edited: changes }, maker.id)
    return { code: blank.code, changed: Object.keys(changes) }
  })
})
