// Ask once, on the first render, who is signed in, so the header shows the right areas.
export default defineNuxtPlugin(async () => {
  await loadCurrentUser()
})
