import type { DispatchQueueEntry } from './useDispatchQueue'
import type { DispatchHeatVerdict, DispatchTemperatureUnit } from './useDispatchWords'

export type DispatchPacking = {
  ok?: true
  boxId: string
  cylinders?: number
  parcelCount?: number
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
export interface DispatchOrder extends DispatchQueueEntry {
  boxes: { id: string, label: string }[]
  packing: DispatchPacking
  checklist: { id: string, label: string }[]
  heatChecks: DispatchHeatCheck[]
  carriers: { id: string, label: string }[]
  shipOn: string[]
  temperatureUnit: DispatchTemperatureUnit
}

/** The refusal's message for one field, or the whole message, of a `$fetch` error. */
function refusalOf(error: unknown, field: string): string {
  const body = (error as { data?: { message?: string, data?: { fields?: Record<string, string> } } })?.data
  return body?.data?.fields?.[field]?.replace(new RegExp(`^${field}:\\s*`), '') ?? body?.message ?? 'The box could not be checked; try again.'
}

/**
 * One order's dispatch page data: the order (a 404 when there is none or it is not in dispatch), the
 * outer box the packer picked (`boxId`, empty for the engine's choice: the order is fetched again
 * packed in that box; a box it does not fit keeps the last packing and says why in `boxError`), and
 * `changed` to reload the order and the queue after a step.
 */
export async function useDispatchOrder(number: string) {
  const key = `dispatch-order-${number}`
  const url = `/api/dispatch/${encodeURIComponent(number)}`
  const boxId = ref('')
  const boxError = ref('')
  const request = useFetch<DispatchOrder>(url, { key })
  const { data: order, error } = request

  async function load() {
    if (!boxId.value) {
      boxError.value = ''
      await refreshNuxtData(key)
      return
    }
    try {
      order.value = await $fetch<DispatchOrder>(url, { query: { boxId: boxId.value } })
      boxError.value = ''
    }
    catch (refusal) {
      boxError.value = refusalOf(refusal, 'boxId')
    }
  }
  watch(boxId, load)
  async function changed() {
    await Promise.all([load(), refreshNuxtData('dispatch-queue')])
  }

  await request
  if (error.value && !order.value) throw createError({ statusCode: error.value.statusCode ?? 404, statusMessage: error.value.statusCode === 404 ? 'No such order in dispatch.' : error.value.statusMessage, fatal: true })
  return { order, boxId, boxError, changed }
}

/** Whether the newest heat check holds the order back today (a hold whose next shipping day is still to come). */
export function dispatchHeld(heat: { verdict: string, nextShipDate: string | null } | null | undefined, today = new Date().toISOString().slice(0, 10)): boolean {
  return heat?.verdict === 'hold' && (!heat.nextShipDate || heat.nextShipDate > today)
}
