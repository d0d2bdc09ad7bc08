/** The shop catalogue for the filters and page in the address, and the number of pages it fills. */
export async function useCatalogue() {
  const filters = useQueryFilters()
  // Read without zod (shopDisplay.ts), so the catalogue's bundle holds no validation library; the API checks it.
  const query = computed(() => catalogueQueryFrom(filters.query.value))
  const request = useFetch('/api/shop/products', { key: 'catalogue', query })
  const { data: catalogue, status } = request
  // The first card's photo is likely the largest thing a phone shows first: asked for before the scripts.
  // (Set up before the await, after which the component's context is gone.)
  useHead(() => {
    const first = catalogue.value?.items[0]?.photoUrls[0]
    return { link: first ? [{ rel: 'preload', as: 'image', href: first, fetchpriority: 'high', tagPriority: 'high' }] : [] }
  })
  await request
  const pages = computed(() => Math.max(1, Math.ceil((catalogue.value?.total ?? 0) / (catalogue.value?.pageSize ?? 12))))
  return { filters, query, catalogue, status, pages }
}
