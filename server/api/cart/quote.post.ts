export default defineEventHandler(async (event) => {
  const input = await readBodyWith(event, cartQuoteSchema)
  return await quoteCart(await useDB(), input)
})
