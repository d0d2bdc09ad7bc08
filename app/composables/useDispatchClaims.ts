/** A breakage claim as the maker sees it: the customer's report, its photos, the order, and the answer once given. */
export interface WorkshopClaim {
  id: number
  status: 'open' | 'replaced' | 'refunded' | 'declined'
  description: string
  createdAt: string
  orderNumber: string
  orderStatus?: string
  customerEmail?: string | null
  items?: { id: number, title: string, format?: string, quantity?: number }[]
  photoUrls: string[]
  resolutionNote?: string | null
  amountMinor?: number | null
  currency?: string
  resolvedAt?: string | null
}

export const claimStatusWords: Record<string, string> = { open: 'Open', replaced: 'Replaced', refunded: 'Refunded', declined: 'Declined' }

/**
 * The maker's breakage claims page: the list filtered by status in the address (`?status=`, all by
 * default), open claims first, and `changed` to reload after a claim is resolved.
 */
export async function useDispatchClaims() {
  const filters = useQueryFilters()
  const status = computed(() => filters.value('status') || undefined)
  const { data, error } = await useFetch<{ claims: WorkshopClaim[] } | WorkshopClaim[]>('/api/workshop/claims', { key: 'workshop-claims', query: { status } })
  const claims = computed(() => {
    const list = Array.isArray(data.value) ? data.value : data.value?.claims ?? []
    return [...list].sort((a, b) => Number(b.status === 'open') - Number(a.status === 'open') || (a.status === 'open' ? a.createdAt.localeCompare(b.createdAt) : b.createdAt.localeCompare(a.createdAt)))
  })
  const changed = () => refreshNuxtData('workshop-claims')
  return { claims, error, filters, changed }
}
