import { defineStore } from 'pinia'
import { cartPinia } from './cartPinia'

export interface CartLine {
  slug: string
  title: string
  qty: number
  // The unit price shown when the line was added: the server re-prices and reports any change.
  seenUnitPriceMinor: number
  currency: string
  format: 'two_minute' | 'four_minute'
  photoUrl: string | null
}

/** One part of a personal message's price as the quote gave it (base, extra length, 4-minute, rush). */
export interface CartPricePart { id: string, label: string, amountMinor: number }

/** A personal message recorded to order: what checkout sends, and the price the customer saw. */
export interface CartMessage {
  /** Made in the browser, to tell lines apart; never sent. */
  key: string
  occasion: string
  recipientName: string
  script: string
  voice: 'maker' | 'upload'
  voiceUploadId?: string
  voiceName?: string
  voiceSeconds?: number
  format: 'two_minute' | 'four_minute'
  rpm?: number
  rush: boolean
  wishedDate: string
  notes?: string
  currency: string
  priceParts: CartPricePart[]
  totalMinor: number
}

const isLine = (line: CartLine) => typeof line?.slug === 'string' && Number.isInteger(line.qty) && line.qty > 0
const isMessage = (message: CartMessage) => typeof message?.key === 'string' && typeof message.script === 'string' && Array.isArray(message.priceParts)

/**
 * The cart lives in the browser (kept across reloads in localStorage, stores/cartPinia.ts); the server
 * prices it at checkout. Cylinders and personal messages sit side by side.
 */
const defineCart = defineStore('cart', () => {
  const lines = ref<CartLine[]>([])
  const messages = ref<CartMessage[]>([])

  const count = computed(() => lines.value.reduce((sum, line) => sum + line.qty, 0) + messages.value.length)
  const empty = computed(() => lines.value.length === 0 && messages.value.length === 0)

  /** What was kept from an older visit, without anything malformed (the storage is the browser's). */
  function tidy() {
    lines.value = Array.isArray(lines.value) ? lines.value.filter(isLine) : []
    messages.value = Array.isArray(messages.value) ? messages.value.filter(isMessage) : []
  }

  function add(line: Omit<CartLine, 'qty'>, qty = 1) {
    const existing = lines.value.find(candidate => candidate.slug === line.slug)
    if (existing) existing.qty = Math.min(50, existing.qty + qty)
    else lines.value.push({ ...line, qty: Math.min(50, qty) })
  }

  function setQty(slug: string, qty: number) {
    const line = lines.value.find(candidate => candidate.slug === slug)
    if (!line) return
    if (qty <= 0) lines.value = lines.value.filter(candidate => candidate.slug !== slug)
    else line.qty = Math.min(50, Math.floor(qty))
  }

  function remove(slug: string) {
    setQty(slug, 0)
  }

  function addMessage(message: Omit<CartMessage, 'key'>) {
    const key = [...crypto.getRandomValues(new Uint8Array(9))].map(byte => byte.toString(16).padStart(2, '0')).join('')
    messages.value.push({ ...message, key })
    return key
  }

  function removeMessage(key: string) {
    messages.value = messages.value.filter(message => message.key !== key)
  }

  /** After the customer has seen the server's prices, those become the prices they agreed to. */
  function acceptQuote(quoted: { slug: string, qty: number, unitPriceMinor: number }[]) {
    lines.value = lines.value
      .map((line) => {
        const match = quoted.find(candidate => candidate.slug === line.slug)
        return match ? { ...line, qty: match.qty, seenUnitPriceMinor: match.unitPriceMinor } : null
      })
      .filter((line): line is CartLine => line !== null)
  }

  function clear() {
    lines.value = []
    messages.value = []
  }

  return { lines, messages, count, empty, tidy, add, setQty, remove, addMessage, removeMessage, acceptQuote, clear }
})

/** The cart, in the app's pinia (made on first use: stores/cartPinia.ts). */
export function useCartStore() {
  return defineCart(cartPinia())
}
