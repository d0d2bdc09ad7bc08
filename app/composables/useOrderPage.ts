/**
 * A customer's order page: the order named in the address, fetched under the key its components
 * refresh (`order-<number>`); a guest's page passes the link's `?t=` token along. Not theirs, or no
 * such order: the page is a 404.
 */
export async function useOrderPage(options: { withLinkToken?: boolean } = {}) {
  const route = useRoute()
  const number = String(route.params.number)
  const query = options.withLinkToken ? { t: route.query.t } : undefined
  // Before the fetch: after an await the page's instance is no longer at hand for useHead.
  useHead({ title: `Order ${number}` })
  const { data: order, error } = await useFetch(`/api/orders/${encodeURIComponent(number)}`, { key: `order-${number}`, query })
  if (error.value) throw createError({ statusCode: 404, statusMessage: 'No such order.', fatal: true })
  return { number, order }
}
