// A mistyped hold (e.g. "30m") would otherwise surface only as failed checkouts; refuse to start instead,
// with a message naming the setting.
export default defineNitroPlugin(() => {
  try {
    checkoutHoldMinutes()
  }
  catch (error) {
    console.error(`[checkout] ${error instanceof Error ? error.message : error}`)
    throw error
  }
})
