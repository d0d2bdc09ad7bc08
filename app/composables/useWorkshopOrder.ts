/**
 * One order for the maker: the order (a 404 when there is none), the refund form (amount, reason and
 * how many of each stock item go back on sale) and cancelling an unpaid order, sharing one submit.
 */
export async function useWorkshopOrder(number: string) {
  const key = `workshop-order-${number}`
  const { data: order, error, refresh } = await useFetch(`/api/workshop/orders/${number}`, { key })
  if (error.value) throw createError({ statusCode: 404, statusMessage: 'No such order.', fatal: true })

  const refund = ref({ amount: '', reason: '' })
  // How many of each stock item go back on sale with this refund (item id → count); empty means none.
  const restock = ref<Record<number, string>>({})
  const restockable = computed(() => order.value?.items.filter(item => item.restockable) ?? [])
  const done = ref('')
  const { busy, errors, submit } = useFormSubmit()
  /** A field error the server gave for one restock line (restock.<index>.itemId or .qty), by item id. */
  function restockError(itemId: number) {
    const sent = restockable.value.filter(item => Number(restock.value[item.id] ?? 0) !== 0)
    const index = sent.findIndex(item => item.id === itemId)
    if (index < 0) return undefined
    return errors.field(`restock.${index}.qty`) ?? errors.field(`restock.${index}.itemId`)
  }
  const refundable = computed(() => order.value && ['paid', 'in_production', 'proof_pending', 'ready_to_pack', 'packed', 'shipped', 'delivered'].includes(order.value.status))
  const remaining = computed(() => order.value ? order.value.totalMinor - order.value.refunds.reduce((sum, r) => sum + r.amountMinor, 0) : 0)
  /** The summary is shown above the page only when no field of the refund form carries the message. */
  const pageError = computed(() => errors.message.value && !errors.field('amountMinor') && !errors.field('reason') && !Object.keys(errors.fields.value).some(field => field.startsWith('restock.'))
    ? errors.message.value
    : '')

  async function sendRefund() {
    errors.clear()
    done.value = ''
    const amountMinor = refund.value.amount.trim() === '' ? undefined : Math.round(Number(refund.value.amount) * 100)
    if (amountMinor !== undefined && !Number.isFinite(amountMinor)) {
      errors.refuse({ amountMinor: 'write the amount like 12.50' })
      return
    }
    const lines = restockable.value
      .map(item => ({ itemId: item.id, qty: Number(restock.value[item.id] ?? 0) }))
      .filter(line => line.qty !== 0)
    await submit(async () => {
      const answer = await $fetch(`/api/workshop/orders/${number}/refund`, { method: 'POST', body: { amountMinor, reason: refund.value.reason, restock: lines } })
      done.value = `Refund of ${formatMoney(answer.amountMinor, order.value!.currency)} sent to the payment service; the order updates when it confirms.`
      refund.value.amount = ''
      refund.value.reason = ''
      restock.value = {}
      setTimeout(() => refresh(), 1500)
    })
  }

  async function cancelOrder() {
    await submit(async () => {
      await $fetch(`/api/workshop/orders/${number}/cancel`, { method: 'POST' })
      done.value = 'Order cancelled; its stock is back on sale.'
      await refresh()
    })
  }

  return { order, refund, restock, restockable, restockError, refundable, remaining, done, busy, errors, pageError, sendRefund, cancelOrder }
}

export type WorkshopOrderPage = Awaited<ReturnType<typeof useWorkshopOrder>>
export type WorkshopOrderView = NonNullable<Awaited<ReturnType<typeof useWorkshopOrder>>['order']['value']>
