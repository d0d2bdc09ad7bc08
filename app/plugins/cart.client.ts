import type { Pinia } from 'pinia'
import { createPersistedState } from 'pinia-plugin-persistedstate'

// The cart is kept in the browser's localStorage (the store's `persist` option says what and under which key).
export default defineNuxtPlugin({
  name: 'cart-persistence',
  setup(nuxtApp) {
    const pinia = nuxtApp.$pinia as Pinia
    pinia.use(createPersistedState({ storage: localStorage }))
    // Carts from before messages were kept as a bare list of cylinders under the older key.
    const older = localStorage.getItem('groovewright-cart-v1')
    if (older !== null) {
      localStorage.removeItem('groovewright-cart-v1')
      try {
        const lines = JSON.parse(older)
        if (Array.isArray(lines) && localStorage.getItem('groovewright-cart-v2') === null) localStorage.setItem('groovewright-cart-v2', JSON.stringify({ lines, messages: [] }))
      }
      catch { /* an unreadable old cart is dropped */ }
    }
    useCartStore()
  },
})
