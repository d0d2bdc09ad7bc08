// Change the units and locale people type and read in. Stored figures keep their own units (°C,
// inches, grams); only what forms take and pages show follows this.
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const input = await readBodyWith(event, unitPreferencesSchema)
  return await putSetting('units', input, maker.id)
})
