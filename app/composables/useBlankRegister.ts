/**
 * The blank register's data: one page of blanks for the filters in the address, the batches to
 * choose from, the number of pages, and entering new blanks (with the message that says which).
 */
export async function useBlankRegister() {
  const { query } = useQueryFilters()
  // Both requests start before either is awaited: after an await a composable has lost the Nuxt context.
  const registerRequest = useFetch('/api/workshop/blanks', { key: 'workshop-blanks', query })
  const batchesRequest = useFetch('/api/workshop/batches', { key: 'workshop-batches' })
  const { data: register, refresh } = registerRequest
  const { data: batches } = batchesRequest
  const pages = computed(() => Math.max(1, Math.ceil((register.value?.total ?? 0) / (register.value?.pageSize ?? 25))))
  const created = ref('')
  const adding = ref(false)

  async function entered(codes: string[]) {
    adding.value = false
    created.value = codes.length === 1 ? `Blank ${codes[0]} entered.` : `${codes.length} blanks entered: ${codes[0]} to ${codes.at(-1)}.`
    await refresh()
  }

  await Promise.all([registerRequest, batchesRequest])
  return { register, batches, pages, created, adding, entered }
}
