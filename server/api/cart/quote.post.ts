export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, cartQuoteSchema)
  // The hold is a setting (NUXT_CHECKOUT_HOLD_MINUTES): the cart page states it from here.
  return { ...await quoteCart(await useDB(), input), holdMinutes: checkoutHoldMinutes() }
})
