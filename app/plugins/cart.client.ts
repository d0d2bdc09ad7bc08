import type { Pinia, PiniaPluginContext } from 'pinia'
import type { CartLine, CartMessage, useCartStore } from '~/stores/cart'

// The cart is kept in the browser's localStorage under one key: read when the cart store is first used,
// written on every change. The store itself is not loaded until a page (or the header's count) asks for it,
// so a page without the cart on it carries none of its code on first load.
const key = 'groovewright-cart-v2'

function keepCart(context: PiniaPluginContext) {
  if (context.store.$id !== 'cart') return
  const store = context.store as unknown as ReturnType<typeof useCartStore>
  // Carts from before messages were kept as a bare list of cylinders under the older key.
  const older = localStorage.getItem('groovewright-cart-v1')
  if (older !== null) {
    localStorage.removeItem('groovewright-cart-v1')
    try {
      const lines = JSON.parse(older)
      if (Array.isArray(lines) && localStorage.getItem(key) === null) localStorage.setItem(key, JSON.stringify({ lines, messages: [] }))
    }
    catch { /* an unreadable old cart is dropped */ }
  }
  try {
    const kept = JSON.parse(localStorage.getItem(key) ?? 'null') as { lines?: unknown, messages?: unknown } | null
    if (kept && typeof kept === 'object') store.$patch({ lines: kept.lines as CartLine[], messages: kept.messages as CartMessage[] })
  }
  catch { /* an unreadable cart is dropped */ }
  // What the browser kept may be malformed: tidy() keeps only well-formed lines and messages.
  store.tidy()
  store.$subscribe((_mutation, state) => {
    localStorage.setItem(key, JSON.stringify({ lines: state.lines, messages: state.messages }))
  }, { detached: true, flush: 'sync' })
}

export default defineNuxtPlugin({
  name: 'cart-persistence',
  setup(nuxtApp) {
    (nuxtApp.$pinia as Pinia).use(keepCart)
  },
})
