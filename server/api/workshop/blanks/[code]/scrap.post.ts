/** Takes the blank out of use for good, with the reason; refused while a ticket holds it or once shipped. */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  const { reason } = await readBodyWith(event, blankScrapSchema)
  const db = await useDB()
  const updated = await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    await assertBlankAction(tx, blank, 'scrap')
    return await changeBlank(tx, blank, { state: 'scrapped' }, reason, maker.id)
  })
  return { code, state: updated.state }
})
