export type ReleaseState = 'idle' | 'working' | 'released' | 'paid' | 'failed' | 'unknown'

/**
 * Back from the payment page's Cancel. Someone who presses Cancel there has decided not to pay now, and
 * expects nothing to stay reserved in their name: the order is given up at once, the cylinders go back on
 * sale (their cart keeps them, and "Go to payment" holds them afresh). Waiting for the hold to run out
 * would only keep the last copy from everyone, this customer included. If giving up fails (network), the
 * notice's button tries again; the server answers the same however often it is asked.
 */
export function useCancelledOrder() {
  const route = useRoute()
  const cancelled = computed(() => typeof route.query.cancelled === 'string' ? route.query.cancelled : '')
  const release = ref<ReleaseState>('idle')
  const releaseMessage = ref('')

  async function giveUp() {
    if (!cancelled.value || release.value === 'working' || release.value === 'released') return
    release.value = 'working'
    const t = typeof route.query.t === 'string' ? route.query.t : undefined
    try {
      await $fetch(`/api/orders/${encodeURIComponent(cancelled.value)}/cancel`, { method: 'POST', body: { t } })
      release.value = 'released'
      releaseMessage.value = ''
      // The link's token is not needed any more; keep it out of the address bar and the history.
      if (t) await navigateTo({ query: { cancelled: cancelled.value } }, { replace: true })
    }
    catch (error) {
      const answer = error as { statusCode?: number, data?: { message?: string, data?: { status?: string } } }
      if (answer.data?.data?.status && answer.data.data.status !== 'awaiting_payment') release.value = 'paid'
      else if (answer.statusCode === 404) release.value = 'unknown'
      else release.value = 'failed'
      releaseMessage.value = answer.data?.message ?? 'The order could not be given up just now.'
    }
  }

  // Only a return from the payment page itself (its address carries the order's signed token) gives the
  // order up by itself; a bare `?cancelled=` link, which anyone could send a signed-in customer, only
  // offers the button.
  onMounted(() => {
    if (typeof route.query.t === 'string') void giveUp()
  })

  return { cancelled, release, releaseMessage, giveUp }
}
