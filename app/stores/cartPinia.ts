import { createPinia, type Pinia, type PiniaPluginContext } from 'pinia'
import type { CartLine, CartMessage, useCartStore } from './cart'

// The app's pinia is made when a store is first used (`useCartStore`), not by a plugin at start: a page
// without the cart on it (the catalogue's first load) carries none of pinia's code. One pinia per app, so one
// per request on the server; the cart is the browser's, so nothing of it travels in the page's payload.
const pinias = new WeakMap<object, Pinia>()

// The cart is kept in the browser's localStorage under one key: read when the cart store is first used,
// written on every change.
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

/** This app's pinia, made on first use; in the browser it keeps the cart in localStorage. */
export function cartPinia(): Pinia {
  const nuxtApp = useNuxtApp()
  let pinia = pinias.get(nuxtApp)
  if (!pinia) {
    pinia = createPinia()
    if (import.meta.client) pinia.use(keepCart)
    nuxtApp.vueApp.use(pinia)
    pinias.set(nuxtApp, pinia)
  }
  return pinia
}
