import { defineStore } from 'pinia'

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

const storageKey = 'groovewright-cart-v1'

/** The cart lives in the browser (kept across reloads); the server prices it at checkout. */
export const useCartStore = defineStore('cart', () => {
  const lines = ref<CartLine[]>([])
  const loaded = ref(false)

  const count = computed(() => lines.value.reduce((sum, line) => sum + line.qty, 0))

  function load() {
    if (loaded.value || !import.meta.client) return
    loaded.value = true
    try {
      const stored = JSON.parse(localStorage.getItem(storageKey) ?? '[]') as CartLine[]
      if (Array.isArray(stored)) lines.value = stored.filter(line => typeof line.slug === 'string' && Number.isInteger(line.qty) && line.qty > 0)
    }
    catch {
      lines.value = []
    }
  }

  function save() {
    if (import.meta.client) localStorage.setItem(storageKey, JSON.stringify(lines.value))
  }

  function add(line: Omit<CartLine, 'qty'>, qty = 1) {
    load()
    const existing = lines.value.find(candidate => candidate.slug === line.slug)
    if (existing) existing.qty = Math.min(50, existing.qty + qty)
    else lines.value.push({ ...line, qty: Math.min(50, qty) })
    save()
  }

  function setQty(slug: string, qty: number) {
    const line = lines.value.find(candidate => candidate.slug === slug)
    if (!line) return
    if (qty <= 0) lines.value = lines.value.filter(candidate => candidate.slug !== slug)
    else line.qty = Math.min(50, Math.floor(qty))
    save()
  }

  function remove(slug: string) {
    setQty(slug, 0)
  }

  /** After the customer has seen the server's prices, those become the prices they agreed to. */
  function acceptQuote(quoted: { slug: string, qty: number, unitPriceMinor: number }[]) {
    lines.value = lines.value
      .map((line) => {
        const match = quoted.find(candidate => candidate.slug === line.slug)
        return match ? { ...line, qty: match.qty, seenUnitPriceMinor: match.unitPriceMinor } : null
      })
      .filter((line): line is CartLine => line !== null)
    save()
  }

  function clear() {
    lines.value = []
    save()
  }

  return { lines, count, load, add, setQty, remove, acceptQuote, clear }
})
