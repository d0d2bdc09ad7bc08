// Money as the shop's pages show it. Kept apart from the pricing engine (money.ts), which reads the engine's
// settings schemas: the browser loads this file with every public page, so it imports nothing.

export class CartPricingError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'CartPricingError'
  }
}

export function assertMinorUnits(value: number, what: string): number {
  if (!Number.isSafeInteger(value)) throw new CartPricingError(`${what} must be a whole number of minor units, got ${value}`)
  return value
}

export function currencyMinorDigits(currency: string): number {
  return new Intl.NumberFormat('en', { style: 'currency', currency }).resolvedOptions().maximumFractionDigits ?? 2
}

/** `formatMoney(123456, 'USD', 'en-US')` → `$1,234.56`. */
export function formatMoney(minor: number, currency: string, locale = 'en-US'): string {
  assertMinorUnits(minor, 'amount')
  const digits = currencyMinorDigits(currency)
  return new Intl.NumberFormat(locale, { style: 'currency', currency, minimumFractionDigits: digits, maximumFractionDigits: digits })
    .format(minor / 10 ** digits)
}
