import type { InternalApi } from 'nitropack/types'
import type { CheckoutForm } from '~/utils/checkoutFields'

export interface CartChange { slug: string, kind: string, message: string }

/**
 * The cart page's data: the server's quote for the cart (re-asked whenever the lines or the address's
 * country or region change: the server decides the zone and tax from them), the changes the customer must accept, and the checkout form with its submit.
 */
export function useCartCheckout() {
  const cart = useCartStore()
  const user = useCurrentUser()

  const quote = ref<CartQuote | null>(null)
  const quoteError = ref('')
  const pendingChanges = ref<CartChange[]>([])
  const { busy, errors, submit } = useFormSubmit()
  const form = reactive<CheckoutForm>({
    email: user.value?.email ?? '',
    name: user.value?.name ?? '',
    line1: '',
    line2: '',
    city: '',
    region: '',
    postalCode: '',
    country: '',
  })

  function fetchQuote() {
    return $fetch('/api/cart/quote', {
      method: 'POST',
      body: { items: cart.lines.map(line => ({ slug: line.slug, qty: line.qty, seenUnitPriceMinor: line.seenUnitPriceMinor })), ...customMessagesBody(cart.messages), shipTo: { country: form.country || undefined, region: form.region || undefined } },
    })
  }

  async function refreshQuote() {
    quoteError.value = ''
    if (cart.empty) {
      quote.value = null
      return
    }
    try {
      quote.value = await fetchQuote()
      pendingChanges.value = quote.value.changes
    }
    catch (error) {
      quoteError.value = (error as { data?: { message?: string } }).data?.message ?? 'The prices could not be checked just now.'
      // A personal message the quote refuses (a wished-for date now too near) is marked on its own line.
      const fields = (error as { data?: { data?: { fields?: Record<string, string> } } }).data?.data?.fields ?? {}
      if (Object.keys(fields).some(key => key.startsWith('customMessages.'))) {
        errors.take(error)
        quoteError.value = 'A personal message below cannot be made as it is: remove it and write it again on the messages page.'
      }
    }
  }

  onMounted(refreshQuote)
  watch(() => [...cart.lines.map(line => `${line.slug}:${line.qty}`), ...cart.messages.map(message => message.key)].join(), refreshQuote)
  watch(() => form.country, refreshQuote)
  // The region is typed: ask again once the customer pauses.
  let regionTimer: ReturnType<typeof setTimeout> | undefined
  watch(() => form.region, () => {
    clearTimeout(regionTimer)
    regionTimer = setTimeout(refreshQuote, 400)
  })

  function acceptChanges() {
    if (!quote.value) return
    cart.acceptQuote(quote.value.lines)
    pendingChanges.value = []
  }

  // One key per distinct checkout request: pressing the button again (or a retry after a lost answer)
  // with the same cart and address sends the same key, and the server answers with the order it already
  // made instead of holding the stock twice. Any change to the cart or the form makes a new key.
  let keyedBody = ''
  let checkoutKey = ''
  function keyFor(body: unknown) {
    const fingerprint = JSON.stringify(body)
    if (fingerprint !== keyedBody) {
      keyedBody = fingerprint
      checkoutKey = [...crypto.getRandomValues(new Uint8Array(18))].map(byte => byte.toString(16).padStart(2, '0')).join('')
    }
    return checkoutKey
  }

  async function pay() {
    errors.clear()
    if (pendingChanges.value.length) return
    await submit(async () => {
      const { line1, line2, city, region, postalCode, country, name } = form
      const body = {
        items: cart.lines.map(line => ({ slug: line.slug, qty: line.qty, seenUnitPriceMinor: line.seenUnitPriceMinor })),
        ...customMessagesBody(cart.messages),
        email: form.email,
        shippingAddress: { name, line1, line2: line2 || undefined, city, region: region || undefined, postalCode, country },
      }
      const answer = await $fetch('/api/checkout', { method: 'POST', body: { ...body, checkoutKey: keyFor(body) } })
      window.location.assign(answer.url!)
    }, {
      leaving: true,
      failed: async (error) => {
        const fields = errors.fields.value
        // Address fields arrive as shippingAddress.name etc.; show them beside the inputs.
        for (const key of Object.keys(fields)) {
          if (key.startsWith('shippingAddress.')) fields[key.slice('shippingAddress.'.length)] = fields[key]!
        }
        const data = (error as { data?: { data?: { changes?: CartChange[] } } }).data?.data
        if (data?.changes) {
          pendingChanges.value = data.changes
          await refreshQuote()
        }
      },
    })
  }

  const holdMinutes = computed(() => quote.value?.holdMinutes ?? 30)

  return { cart, quote, quoteError, pendingChanges, acceptChanges, form, busy, errors, pay, holdMinutes }
}

/** The server's answer to `POST /api/cart/quote`. */
export type CartQuote = InternalApi['/api/cart/quote']['post']
