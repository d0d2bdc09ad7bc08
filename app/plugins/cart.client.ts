// The cart is kept in localStorage; read it once the app is running in the browser.
export default defineNuxtPlugin(() => {
  useCartStore().load()
})
