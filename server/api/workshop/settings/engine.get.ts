// The figures the engine and the bench calculators work with (speaking rate, reaming and shaving,
// fit and heat, packing, prices), with the shop defaults beside them.
export default defineEventHandler(async (event) => {
  await requireRole(event, 'maker')
  return { settings: await getSetting('engine'), defaults: defaultEngineSettings }
})
