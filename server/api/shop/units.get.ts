// The shop's units and locale: what every page shows temperatures, lengths, weights and dates in.
// Public: a product page shows a blank's sizes in them too.
export default defineEventHandler(async () => await getSetting('units'))
