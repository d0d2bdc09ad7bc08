// Replace the engine's figures. A figure left out takes its default; lengths may be typed as
// fractions or millimetres (they are stored in inches).
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const input = await readBodyWith(event, engineSettingsSchema)
  return { settings: await putSetting('engine', input, maker.id), defaults: defaultEngineSettings }
})
