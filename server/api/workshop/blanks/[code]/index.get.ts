/** Everything about one blank: its batch, wall left, logs with the engine's plans, tests, tickets and test cuts. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  const code = blankCodeParam(event)
  return await blankDossier(await useDB(), code)
})
