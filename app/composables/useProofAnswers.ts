/** A personal message as the order's answer shows it, with its proofs. */
export interface OrderMessageView {
  itemId: number
  occasion: string
  recipientName: string
  scriptStart: string
  voice: 'maker' | 'upload'
  format: 'two_minute' | 'four_minute'
  rpm: number | null
  rush: boolean
  wishedDate: string
  priceParts: { id: string, label: string, amountMinor: number }[]
  recutsUsed: number
  freeRecutsLeft: number
  proofs: ProofView[]
}

export interface ProofView {
  id: number
  createdAt: string
  note: string | null
  answer: 'waiting' | 'approved' | 'recut'
  answerNote: string | null
  answeredAt: string | null
  audioUrl: string | null
}

/**
 * The customer's answers to a proof: approve it, or ask for a re-cut with a note (and, past the free
 * re-cuts, a paid one once they have seen the price). Guests' links carry the order's token (`?t=`).
 * After an answer the order is read again.
 */
export function useProofAnswers(orderNumber: string) {
  const route = useRoute()
  const token = computed(() => (typeof route.query.t === 'string' ? route.query.t : undefined))
  const base = (proofId: number) => `/api/orders/${encodeURIComponent(orderNumber)}/proofs/${proofId}`
  const refresh = () => refreshNuxtData(`order-${orderNumber}`)

  async function approve(proofId: number) {
    await $fetch(`${base(proofId)}/approve`, { method: 'POST', query: { t: token.value }, body: {} })
    await refresh()
  }

  async function recut(proofId: number, note: string, pay?: boolean) {
    const answer = await $fetch<{ url?: string }>(`${base(proofId)}/recut`, { method: 'POST', query: { t: token.value }, body: { note, pay } })
    // A paid re-cut may go through the payment page first.
    if (answer?.url) return window.location.assign(answer.url)
    await refresh()
  }

  /** The proof's sound, with the order's token for a guest when the address lacks it. */
  const audioHref = (url: string) => (token.value && !url.includes('t=') ? `${url}${url.includes('?') ? '&' : '?'}t=${encodeURIComponent(token.value)}` : url)

  return { approve, recut, audioHref }
}

export type ProofAnswers = ReturnType<typeof useProofAnswers>
