// Settings that would otherwise surface only later refuse the start instead, with a message naming the
// setting: a mistyped hold (e.g. "30m") as failed checkouts, the published local webhook secret beside a
// real payment key as forged payments believed, shared uploads without their bucket as failed uploads.
export default defineNitroPlugin(() => {
  const checks: [string, () => unknown][] = [['checkout', checkoutHoldMinutes], ['payments', checkPaymentSettings], ['uploads', checkUploadSettings]]
  for (const [area, check] of checks) {
    try {
      check()
    }
    catch (error) {
      console.error(`[${area}] ${error instanceof Error ? error.message : error}`)
      throw error
    }
  }
})
