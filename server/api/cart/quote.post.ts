export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, cartQuoteSchema)
  const user = await currentUser(event)
  // The hold is a setting (NUXT_CHECKOUT_HOLD_MINUTES): the cart page states it from here. Personal
  // messages are priced beside the cylinders (`messageLines`) and counted in the sums.
  return { ...await quoteCartWithMessages(await useDB(), input, user?.id ?? null), holdMinutes: checkoutHoldMinutes() }
})
