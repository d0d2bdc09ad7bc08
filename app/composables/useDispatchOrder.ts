import type { DispatchEntry } from './useDispatchQueue'
import type { DispatchHeatVerdict, DispatchTemperatureUnit } from './useDispatchWords'

export type DispatchPacking = {
  ok?: true
  boxId: string
  tube: string
  innerBox: string | null
  outerBox: string
  outsideIn: number[]
  actualWeightG: number
  dimensionalWeightG: number
  billableWeightG: number
  cushioningIn: number
} | { ok: false, reason: string }

export interface DispatchHeatCheck {
  forecastHigh?: number
  unit?: DispatchTemperatureUnit
  forecastHighC: number
  transitDays?: number
  verdict: DispatchHeatVerdict
  reasons: string[]
  nextShipDate: string | null
  checkedAt?: string
}

/** One order at the packing bench: the queue's entry plus the boxes, the engine's packing, the checklist and carriers. */
export interface DispatchOrder extends DispatchEntry {
  boxes: { id: string, label: string }[]
  packing: DispatchPacking
  checklist: { id: string, label: string }[]
  heatChecks: DispatchHeatCheck[]
  carriers: { id: string, label: string }[]
  shipOn: string[]
  temperatureUnit: DispatchTemperatureUnit
}

/**
 * One order's dispatch page data: the order (a 404 when there is none or it is not for dispatch), the
 * box the packer picked (`boxId`, empty for the engine's choice; the answer is fetched again for it),
 * and `changed` to reload the order and the queue after a step.
 */
export async function useDispatchOrder(number: string) {
  const key = `dispatch-order-${number}`
  const boxId = ref('')
  const request = useFetch<DispatchOrder>(`/api/dispatch/${encodeURIComponent(number)}`, {
    key,
    query: { boxId: computed(() => boxId.value || undefined) },
  })
  const { data: order, error } = request
  async function changed() {
    await Promise.all([refreshNuxtData(key), refreshNuxtData('dispatch-queue')])
  }
  await request
  if (error.value && !order.value) throw createError({ statusCode: error.value.statusCode ?? 404, statusMessage: error.value.statusCode === 404 ? 'No such order for dispatch.' : error.value.statusMessage, fatal: true })
  return { order, boxId, changed, pending: request.pending }
}
