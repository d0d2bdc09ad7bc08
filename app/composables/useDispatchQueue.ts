import type { DispatchHeatVerdict } from './useDispatchWords'

/** One parcel as the packing engine plans it (or why no box fits). */
export type DispatchParcel = {
  cylinders: number
  ok: true
  tube: string
  innerBox: string | null
  outerBox: string
  outsideIn: number[]
  actualWeightG: number
  dimensionalWeightG?: number
  billableWeightG: number
} | { cylinders: number, ok: false, reason: string }

export interface DispatchAddress { name: string, line1: string, line2?: string | null, city: string, region?: string | null, postalCode: string, country: string }

export interface DispatchHeat {
  verdict: DispatchHeatVerdict
  reasons: string[]
  nextShipDate: string | null
  forecastHighC: number
  checkedAt: string
}

export interface DispatchShipment {
  carrier: string | null
  carrierLabel?: string | null
  trackingNumber: string | null
  packedAt: string | null
  shippedAt: string | null
  deliveredAt: string | null
}

/** An order in the dispatch queue: where it goes, what is in it and how to pack it; never a price. */
export interface DispatchQueueEntry {
  number: string
  status: string
  since: string
  promisedDate: string | null
  shipTo: DispatchAddress
  zone: string
  contents: { title: string, format: string, quantity: number, blankCodes?: string[] }[]
  cylinders: number
  parcels: DispatchParcel[]
  heat: DispatchHeat | null
  shipment: DispatchShipment | null
}

export interface DispatchQueue {
  readyToPack: DispatchQueueEntry[]
  held?: DispatchQueueEntry[]
  packed: DispatchQueueEntry[]
  shipped?: DispatchQueueEntry[]
  more: boolean
  temperatureUnit?: 'C' | 'F'
}

export const dispatchTabs = [
  { id: 'ready', key: 'readyToPack', title: 'Ready to pack', empty: 'Nothing is ready to pack. Orders arrive here once every cylinder in them is made and checked.' },
  { id: 'held', key: 'held', title: 'Held for heat', empty: 'No parcel is held for heat.' },
  { id: 'packed', key: 'packed', title: 'Packed', empty: 'No packed parcel is waiting for the carrier.' },
  { id: 'shipped', key: 'shipped', title: 'Shipped', empty: 'Nothing shipped in the last 30 days.' },
] as const
export type DispatchTabId = typeof dispatchTabs[number]['id']

/**
 * The dispatch queue page's data: the four lists from the server (the search `q` finds packed and
 * shipped parcels by order or tracking number), the open tab from the address (`?tab=`), and the
 * query helpers for the tab bar and the search box.
 */
export async function useDispatchQueue() {
  const filters = useQueryFilters({ defaults: { tab: 'ready' } })
  const q = computed(() => filters.value('q') || undefined)
  const { data: queue, error, refresh } = await useFetch<DispatchQueue>('/api/dispatch/queue', { key: 'dispatch-queue', query: { q } })
  const tab = computed<DispatchTabId>(() => dispatchTabs.find(entry => entry.id === filters.value('tab'))?.id ?? 'ready')
  const lists = computed(() => dispatchTabs.map(entry => ({ ...entry, entries: queue.value?.[entry.key] ?? [] })))
  const current = computed(() => lists.value.find(entry => entry.id === tab.value)!)
  return { queue, error, refresh, filters, tab, lists, current }
}
