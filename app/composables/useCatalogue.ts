/** The shop catalogue for the filters and page in the address, and the number of pages it fills. */
export async function useCatalogue() {
  const filters = useQueryFilters()
  // Read without zod (shopDisplay.ts), so the catalogue's bundle holds no validation library; the API checks it.
  const query = computed(() => catalogueQueryFrom(filters.query.value))
  const { data: catalogue, status } = await useFetch('/api/shop/products', { key: 'catalogue', query })
  const pages = computed(() => Math.max(1, Math.ceil((catalogue.value?.total ?? 0) / (catalogue.value?.pageSize ?? 12))))
  return { filters, query, catalogue, status, pages }
}
