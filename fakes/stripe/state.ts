// The Stripe stand-in's memory: checkout sessions, payment intents, charges, refunds and events, and the
// operations on them (create, pay, decline, expire, refund). Objects follow the real API's shapes for the
// fields the shop reads; everything is kept in memory and lost on restart.
import {
  ApiError, invalid, isObject, makeId, missing, notFound, paramName, readArray, readEnum, readInteger,
  readMetadata, readObject, readString, rejectUnknown, unixNow, type Params,
} from './util'

export interface LineItem {
  id: string
  object: 'item'
  amount_discount: number
  amount_subtotal: number
  amount_tax: number
  amount_total: number
  currency: string
  description: string
  price: {
    id: string
    object: 'price'
    active: boolean
    currency: string
    product: string
    type: 'one_time'
    unit_amount: number
    livemode: false
    metadata: Record<string, string>
  }
  product_data: { name: string, description: string | null, images: string[], metadata: Record<string, string> }
  quantity: number
}

export interface CheckoutSession {
  id: string
  object: 'checkout.session'
  amount_subtotal: number
  amount_total: number
  cancel_url: string | null
  client_reference_id: string | null
  created: number
  currency: string
  customer: string | null
  customer_details: { email: string | null, name: string | null, phone: string | null, address: null, tax_exempt: 'none', tax_ids: [] } | null
  customer_email: string | null
  expires_at: number
  livemode: false
  locale: string | null
  metadata: Record<string, string>
  mode: 'payment'
  payment_intent: string | null
  payment_method_types: string[]
  payment_status: 'unpaid' | 'paid' | 'no_payment_required'
  shipping_cost: { amount_subtotal: number, amount_tax: number, amount_total: number, shipping_rate: string } | null
  status: 'open' | 'complete' | 'expired'
  submit_type: string | null
  success_url: string | null
  total_details: { amount_discount: number, amount_shipping: number, amount_tax: number }
  ui_mode: 'hosted'
  url: string | null
  [key: string]: unknown
}

export interface PaymentIntent {
  id: string
  object: 'payment_intent'
  amount: number
  amount_capturable: number
  amount_received: number
  canceled_at: number | null
  cancellation_reason: string | null
  capture_method: 'automatic_async'
  client_secret: string
  confirmation_method: 'automatic'
  created: number
  currency: string
  customer: string | null
  description: string | null
  last_payment_error: Record<string, unknown> | null
  latest_charge: string | null
  livemode: false
  metadata: Record<string, string>
  next_action: null
  payment_method: string | null
  payment_method_types: string[]
  receipt_email: string | null
  status: 'requires_payment_method' | 'succeeded' | 'canceled'
}

export interface Refund {
  id: string
  object: 'refund'
  amount: number
  balance_transaction: string | null
  charge: string
  created: number
  currency: string
  metadata: Record<string, string>
  payment_intent: string
  reason: string | null
  receipt_number: string | null
  status: 'pending' | 'succeeded' | 'failed' | 'canceled'
}

export interface Charge {
  id: string
  object: 'charge'
  amount: number
  amount_captured: number
  amount_refunded: number
  billing_details: { email: string | null, name: string | null, phone: string | null, address: null }
  captured: boolean
  created: number
  currency: string
  description: string | null
  failure_code: string | null
  failure_message: string | null
  livemode: false
  metadata: Record<string, string>
  outcome: Record<string, unknown>
  paid: boolean
  payment_intent: string
  payment_method: string
  payment_method_details: { type: 'card', card: { brand: string, last4: string, exp_month: number, exp_year: number, country: string, funding: string } }
  receipt_email: string | null
  refunded: boolean
  status: 'succeeded' | 'failed'
  refunds?: { object: 'list', data: Refund[], has_more: boolean, total_count: number, url: string }
}

export interface StripeEvent {
  id: string
  object: 'event'
  api_version: string
  created: number
  data: { object: unknown, previous_attributes?: Record<string, unknown> }
  livemode: false
  pending_webhooks: number
  request: { id: string | null, idempotency_key: string | null }
  type: string
}

export type EventType = 'checkout.session.completed' | 'checkout.session.expired' | 'payment_intent.payment_failed' | 'charge.refunded' | 'charge.refund.updated'

export interface RequestInfo { id: string | null, idempotency_key: string | null }
export const NO_REQUEST: RequestInfo = { id: null, idempotency_key: null }

interface SessionExtra {
  lineItems: LineItem[]
  paymentIntentData: { metadata: Record<string, string>, description: string | null, receipt_email: string | null }
}

/** Every real parameter of `POST /v1/checkout/sessions`; those the fake does not model are accepted and ignored. */
const SESSION_CREATE_PARAMS = [
  'adaptive_pricing', 'after_expiration', 'allow_promotion_codes', 'automatic_tax', 'billing_address_collection',
  'branding_settings', 'cancel_url', 'client_reference_id', 'consent_collection', 'currency', 'custom_fields',
  'custom_text', 'customer', 'customer_account', 'customer_creation', 'customer_email', 'customer_update',
  'discounts', 'excluded_payment_method_types', 'expand', 'expires_at', 'invoice_creation', 'line_items', 'locale',
  'metadata', 'mode', 'name_collection', 'optional_items', 'origin_context', 'payment_intent_data',
  'payment_method_collection', 'payment_method_configuration', 'payment_method_data', 'payment_method_options',
  'payment_method_types', 'permissions', 'phone_number_collection', 'redirect_on_completion', 'return_url',
  'saved_payment_method_options', 'setup_intent_data', 'shipping_address_collection', 'shipping_options',
  'submit_type', 'subscription_data', 'success_url', 'tax_id_collection', 'ui_mode', 'wallet_options',
] as const

const LINE_ITEM_PARAMS = ['adjustable_quantity', 'dynamic_tax_rates', 'price', 'price_data', 'quantity', 'tax_rates', 'metadata'] as const
const PRICE_DATA_PARAMS = ['currency', 'product', 'product_data', 'recurring', 'tax_behavior', 'unit_amount', 'unit_amount_decimal'] as const
const PRODUCT_DATA_PARAMS = ['name', 'description', 'images', 'metadata', 'tax_code', 'unit_label'] as const
const PI_DATA_PARAMS = [
  'application_fee_amount', 'capture_method', 'description', 'metadata', 'on_behalf_of', 'receipt_email',
  'setup_future_usage', 'shipping', 'statement_descriptor', 'statement_descriptor_suffix', 'transfer_data', 'transfer_group',
] as const
const REFUND_CREATE_PARAMS = [
  'amount', 'charge', 'currency', 'customer', 'expand', 'instructions_email', 'metadata', 'origin', 'payment_intent',
  'reason', 'refund_application_fee', 'reverse_transfer',
] as const

const MIN_EXPIRY = 30 * 60
const MAX_EXPIRY = 24 * 60 * 60
/** Seconds of grace for the clock and the request's travel time on the 30 min – 24 h window. */
const EXPIRY_SLACK = 10

export interface StateOptions {
  apiVersion: string
  /** Base of the hosted page links, e.g. `http://127.0.0.1:12111`. */
  publicUrl: () => string
  /** Called for every new event; `pending_webhooks` is set by the caller. */
  onEvent: (event: StripeEvent) => void
}

export function createState(options: StateOptions) {
  const sessions = new Map<string, CheckoutSession>()
  const extras = new Map<string, SessionExtra>()
  const paymentIntents = new Map<string, PaymentIntent>()
  const charges = new Map<string, Charge>()
  const refunds = new Map<string, Refund>()
  const events = new Map<string, StripeEvent>()
  /** The next refund starts `pending` (as some payment methods' do) instead of `succeeded`. */
  let nextRefundPending = false

  const newestFirst = <T>(map: Map<string, T>) => [...map.values()].reverse()

  function reset() {
    for (const map of [sessions, extras, paymentIntents, charges, refunds, events]) map.clear()
  }

  function emit(type: EventType | string, object: unknown, request: RequestInfo = NO_REQUEST, previous?: Record<string, unknown>) {
    const event: StripeEvent = {
      id: makeId('evt_'),
      object: 'event',
      api_version: options.apiVersion,
      created: unixNow(),
      data: { object: structuredClone(object), ...(previous ? { previous_attributes: previous } : {}) },
      livemode: false,
      pending_webhooks: 0,
      request: { ...request },
      type,
    }
    events.set(event.id, event)
    options.onEvent(event)
    return event
  }

  function getSession(id: string, param = 'session') {
    const session = sessions.get(id)
    if (!session) throw notFound('checkout.session', id, param)
    return session
  }

  function createSession(params: Params): CheckoutSession {
    rejectUnknown(params, SESSION_CREATE_PARAMS)
    const mode = readString(params.mode, 'mode', { required: true })
    if (mode !== 'payment') {
      throw invalid(mode === 'subscription' || mode === 'setup'
        ? `This local stand-in supports only mode=payment (got ${mode}).`
        : `Invalid mode: must be one of payment, setup, or subscription`, 'mode', 'parameter_invalid_string')
    }
    const uiMode = readString(params.ui_mode, 'ui_mode')
    if (uiMode && uiMode !== 'hosted') throw invalid(`This local stand-in supports only ui_mode=hosted (got ${uiMode}).`, 'ui_mode')

    const rawItems = readArray(params.line_items, 'line_items')
    if (!rawItems || rawItems.length === 0) throw missing('line_items')
    if (rawItems.length > 100) throw invalid('You may only specify up to 100 line items.', 'line_items')
    const sessionCurrency = readCurrency(params.currency, 'currency')
    const lineItems = rawItems.map((raw, index) => readLineItem(raw, index))
    const currency = sessionCurrency ?? lineItems[0]!.currency
    lineItems.forEach((item, index) => {
      if (item.currency !== currency) {
        throw invalid(`All line items must use the same currency; line_items[${index}] uses ${item.currency}, expected ${currency}.`, paramName('line_items', index, 'price_data', 'currency'))
      }
    })

    const successUrl = readUrl(params.success_url, 'success_url', true)!
    const cancelUrl = readUrl(params.cancel_url, 'cancel_url', false)
    const customerEmail = readString(params.customer_email, 'customer_email', { max: 800 })
    if (customerEmail !== undefined && !/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(customerEmail)) {
      throw invalid(`Invalid email address: ${customerEmail}`, 'customer_email', 'email_invalid')
    }
    const clientReferenceId = readString(params.client_reference_id, 'client_reference_id', { max: 200 })
    const metadata = readMetadata(params.metadata) ?? {}
    const locale = readString(params.locale, 'locale')
    const submitType = readEnum(params.submit_type, 'submit_type', ['auto', 'book', 'donate', 'pay', 'subscribe'] as const)

    const piData = readObject(params.payment_intent_data, 'payment_intent_data') ?? {}
    rejectUnknown(piData, PI_DATA_PARAMS, 'payment_intent_data')
    const piMetadata = readMetadata(piData.metadata, 'payment_intent_data[metadata]') ?? {}
    const piDescription = readString(piData.description, 'payment_intent_data[description]', { max: 1000 }) ?? null
    const piReceiptEmail = readString(piData.receipt_email, 'payment_intent_data[receipt_email]') ?? null

    const created = unixNow()
    const expiresAt = readInteger(params.expires_at, 'expires_at') ?? created + MAX_EXPIRY
    if (expiresAt < created + MIN_EXPIRY - EXPIRY_SLACK) {
      throw invalid('The `expires_at` timestamp must be at least 30 minutes from Checkout Session creation.', 'expires_at', 'parameter_invalid_integer')
    }
    if (expiresAt > created + MAX_EXPIRY + EXPIRY_SLACK) {
      throw invalid('The `expires_at` timestamp must be less than 24 hours from Checkout Session creation.', 'expires_at', 'parameter_invalid_integer')
    }

    const shippingAmount = readShipping(params.shipping_options, currency)
    const subtotal = lineItems.reduce((sum, item) => sum + item.amount_subtotal, 0)
    const rawTypes = readArray(params.payment_method_types, 'payment_method_types')
    const id = makeId('cs_test_', 58)
    const session: CheckoutSession = {
      id,
      object: 'checkout.session',
      after_expiration: null,
      allow_promotion_codes: null,
      amount_subtotal: subtotal,
      amount_total: subtotal + shippingAmount,
      automatic_tax: { enabled: false, liability: null, status: null },
      billing_address_collection: readString(params.billing_address_collection, 'billing_address_collection') ?? null,
      cancel_url: cancelUrl ?? null,
      client_reference_id: clientReferenceId ?? null,
      client_secret: null,
      created,
      currency,
      customer: readString(params.customer, 'customer') ?? null,
      customer_creation: 'if_required',
      customer_details: null,
      customer_email: customerEmail ?? null,
      expires_at: expiresAt,
      invoice: null,
      livemode: false,
      locale: locale ?? null,
      metadata,
      mode: 'payment',
      payment_intent: null,
      payment_link: null,
      payment_method_collection: 'if_required',
      payment_method_types: rawTypes ? rawTypes.map((type, index) => readString(type, paramName('payment_method_types', index), { required: true })!) : ['card'],
      payment_status: 'unpaid',
      recovered_from: null,
      setup_intent: null,
      shipping_cost: shippingAmount ? { amount_subtotal: shippingAmount, amount_tax: 0, amount_total: shippingAmount, shipping_rate: makeId('shr_') } : null,
      shipping_details: null,
      status: 'open',
      submit_type: submitType ?? null,
      subscription: null,
      success_url: successUrl,
      total_details: { amount_discount: 0, amount_shipping: shippingAmount, amount_tax: 0 },
      ui_mode: 'hosted',
      url: `${options.publicUrl()}/pay/${id}`,
    }
    sessions.set(id, session)
    extras.set(id, {
      lineItems,
      paymentIntentData: { metadata: piMetadata, description: piDescription, receipt_email: piReceiptEmail },
    })
    return session
  }

  function readCurrency(value: unknown, param: string, required = false) {
    const currency = readString(value, param, { required })
    if (currency === undefined) return undefined
    const lower = currency.toLowerCase()
    let known = /^[a-z]{3}$/.test(lower)
    if (known) {
      try {
        new Intl.NumberFormat('en', { style: 'currency', currency: lower.toUpperCase() })
      }
      catch {
        known = false
      }
    }
    if (!known) throw invalid(`Invalid currency: ${currency}. Stripe currently supports these currencies: …`, param, 'parameter_invalid_string')
    return lower
  }

  function readUrl(value: unknown, param: string, required: boolean) {
    const text = readString(value, param, { required, max: 5000 })
    if (text === undefined) return undefined
    try {
      const url = new URL(text.replaceAll('{CHECKOUT_SESSION_ID}', 'x'))
      if (url.protocol !== 'http:' && url.protocol !== 'https:') throw new Error('scheme')
    }
    catch {
      throw invalid('Not a valid URL', param, 'url_invalid')
    }
    return text
  }

  function readLineItem(raw: unknown, index: number): LineItem {
    const base = paramName('line_items', index)
    if (!isObject(raw)) throw invalid('Invalid object', base, 'parameter_invalid_object')
    rejectUnknown(raw, LINE_ITEM_PARAMS, base)
    if (raw.price !== undefined) {
      throw new ApiError(400, {
        type: 'invalid_request_error',
        code: 'resource_missing',
        message: `No such price: '${String(raw.price)}' (this local stand-in knows only price_data)`,
        param: paramName('line_items', index, 'price'),
      }, true)
    }
    const priceData = readObject(raw.price_data, paramName(base, 'price_data'))
    if (!priceData) throw missing(paramName(base, 'price_data'))
    rejectUnknown(priceData, PRICE_DATA_PARAMS, paramName(base, 'price_data'))
    if (priceData.recurring !== undefined) {
      throw invalid('You specified `payment` mode but passed a recurring price. Either switch to `subscription` mode or use only one-time prices.', paramName(base, 'price_data', 'recurring'))
    }
    const currency = readCurrency(priceData.currency, paramName(base, 'price_data', 'currency'), true)!
    let unitAmount = readInteger(priceData.unit_amount, paramName(base, 'price_data', 'unit_amount'), { min: 0, max: 99_999_999 })
    if (unitAmount === undefined && priceData.unit_amount_decimal !== undefined) {
      const decimal = readString(priceData.unit_amount_decimal, paramName(base, 'price_data', 'unit_amount_decimal'))!
      if (!/^\d+(\.0+)?$/.test(decimal)) {
        throw invalid('This local stand-in accepts only whole minor units in unit_amount_decimal.', paramName(base, 'price_data', 'unit_amount_decimal'))
      }
      unitAmount = Number.parseInt(decimal, 10)
    }
    if (unitAmount === undefined) throw missing(paramName(base, 'price_data', 'unit_amount'))
    if (priceData.product !== undefined) {
      throw invalid(`No such product: '${String(priceData.product)}' (this local stand-in knows only product_data)`, paramName(base, 'price_data', 'product'), 'resource_missing')
    }
    const productData = readObject(priceData.product_data, paramName(base, 'price_data', 'product_data'))
    if (!productData) throw missing(paramName(base, 'price_data', 'product_data'))
    rejectUnknown(productData, PRODUCT_DATA_PARAMS, paramName(base, 'price_data', 'product_data'))
    const name = readString(productData.name, paramName(base, 'price_data', 'product_data', 'name'), { required: true, max: 5000 })!
    const description = readString(productData.description, paramName(base, 'price_data', 'product_data', 'description'), { max: 40000 }) ?? null
    const images = (readArray(productData.images, paramName(base, 'price_data', 'product_data', 'images')) ?? [])
      .map((image, imageIndex) => readString(image, paramName(base, 'price_data', 'product_data', 'images', imageIndex), { required: true })!)
    const productMetadata = readMetadata(productData.metadata, paramName(base, 'price_data', 'product_data', 'metadata')) ?? {}
    const quantity = readInteger(raw.quantity, paramName(base, 'quantity'), { required: true, min: 1, max: 999_999 })!
    const amount = unitAmount * quantity
    return {
      id: makeId('li_'),
      object: 'item',
      amount_discount: 0,
      amount_subtotal: amount,
      amount_tax: 0,
      amount_total: amount,
      currency,
      description: name,
      price: {
        id: makeId('price_'),
        object: 'price',
        active: false,
        currency,
        product: makeId('prod_', 14),
        type: 'one_time',
        unit_amount: unitAmount,
        livemode: false,
        metadata: {},
      },
      product_data: { name, description, images, metadata: productMetadata },
      quantity,
    }
  }

  function readShipping(value: unknown, currency: string) {
    const options = readArray(value, 'shipping_options')
    if (!options || options.length === 0) return 0
    const first = options[0]
    if (!isObject(first) || !isObject(first.shipping_rate_data)) {
      throw invalid('This local stand-in accepts only shipping_options[0][shipping_rate_data].', paramName('shipping_options', 0))
    }
    const fixed = readObject(first.shipping_rate_data.fixed_amount, 'shipping_options[0][shipping_rate_data][fixed_amount]')
    if (!fixed) return 0
    const amount = readInteger(fixed.amount, 'shipping_options[0][shipping_rate_data][fixed_amount][amount]', { required: true, min: 0 })!
    const shippingCurrency = readCurrency(fixed.currency, 'shipping_options[0][shipping_rate_data][fixed_amount][currency]', true)
    if (shippingCurrency !== currency) throw invalid('The shipping rate currency must match the line items\' currency.', 'shipping_options[0][shipping_rate_data][fixed_amount][currency]')
    return amount
  }

  function lineItemsOf(sessionId: string) {
    return extras.get(sessionId)?.lineItems ?? []
  }

  /** The line item as the API's list endpoint shows it (no private product data). */
  function publicLineItem(item: LineItem) {
    const { product_data: _productData, ...rest } = item
    return rest
  }

  function expireSession(id: string, request: RequestInfo = NO_REQUEST, options: { api?: boolean } = {}) {
    const session = getSession(id)
    if (session.status !== 'open') {
      throw invalid(`Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of \`${session.status}\`.`, undefined, undefined, !options.api)
    }
    session.status = 'expired'
    session.url = null
    if (session.payment_intent) {
      const intent = paymentIntents.get(session.payment_intent)
      if (intent && intent.status === 'requires_payment_method') {
        intent.status = 'canceled'
        intent.canceled_at = unixNow()
        intent.cancellation_reason = 'abandoned'
      }
    }
    const event = emit('checkout.session.expired', session, request)
    return { session, event }
  }

  function sweepExpired() {
    const due = unixNow()
    const expired: string[] = []
    for (const session of sessions.values()) {
      if (session.status === 'open' && session.expires_at <= due) {
        expireSession(session.id)
        expired.push(session.id)
      }
    }
    return expired
  }

  function intentFor(session: CheckoutSession): PaymentIntent {
    const existing = session.payment_intent ? paymentIntents.get(session.payment_intent) : undefined
    if (existing) return existing
    const extra = extras.get(session.id)!
    const id = makeId('pi_3')
    const intent: PaymentIntent = {
      id,
      object: 'payment_intent',
      amount: session.amount_total,
      amount_capturable: 0,
      amount_received: 0,
      canceled_at: null,
      cancellation_reason: null,
      capture_method: 'automatic_async',
      client_secret: `${id}_secret_${makeId('', 25)}`,
      confirmation_method: 'automatic',
      created: unixNow(),
      currency: session.currency,
      customer: session.customer,
      description: extra.paymentIntentData.description,
      last_payment_error: null,
      latest_charge: null,
      livemode: false,
      metadata: { ...extra.paymentIntentData.metadata, checkout_session: session.id },
      next_action: null,
      payment_method: null,
      payment_method_types: [...session.payment_method_types],
      receipt_email: extra.paymentIntentData.receipt_email ?? session.customer_email,
      status: 'requires_payment_method',
    }
    paymentIntents.set(id, intent)
    session.payment_intent = id
    return intent
  }

  function newCharge(intent: PaymentIntent, session: CheckoutSession, succeeded: boolean, paymentMethod: string): Charge {
    const charge: Charge = {
      id: makeId('ch_3'),
      object: 'charge',
      amount: intent.amount,
      amount_captured: succeeded ? intent.amount : 0,
      amount_refunded: 0,
      billing_details: { email: session.customer_email, name: null, phone: null, address: null },
      captured: succeeded,
      created: unixNow(),
      currency: intent.currency,
      description: intent.description,
      failure_code: succeeded ? null : 'card_declined',
      failure_message: succeeded ? null : 'Your card was declined.',
      livemode: false,
      metadata: { ...intent.metadata },
      outcome: succeeded
        ? { network_status: 'approved_by_network', reason: null, risk_level: 'normal', seller_message: 'Payment complete.', type: 'authorized' }
        : { network_status: 'declined_by_network', reason: 'generic_decline', risk_level: 'normal', seller_message: 'The bank did not return any further details with this decline.', type: 'issuer_declined' },
      paid: succeeded,
      payment_intent: intent.id,
      payment_method: paymentMethod,
      payment_method_details: {
        type: 'card',
        card: { brand: 'visa', last4: succeeded ? '4242' : '0002', exp_month: 12, exp_year: new Date().getFullYear() + 3, country: 'GB', funding: 'credit' },
      },
      receipt_email: intent.receipt_email,
      refunded: false,
      status: succeeded ? 'succeeded' : 'failed',
    }
    charges.set(charge.id, charge)
    return charge
  }

  function assertOpen(session: CheckoutSession) {
    if (session.status !== 'open') {
      throw invalid(`This Checkout Session is ${session.status === 'complete' ? 'already complete' : 'expired'}; only open sessions can be paid or declined.`, 'session', 'checkout_session_not_open', false)
    }
  }

  /** The customer pays: the session completes and `checkout.session.completed` is emitted. */
  function completeSession(id: string) {
    const session = getSession(id)
    assertOpen(session)
    const intent = intentFor(session)
    const paymentMethod = makeId('pm_')
    const charge = newCharge(intent, session, true, paymentMethod)
    intent.status = 'succeeded'
    intent.amount_received = intent.amount
    intent.last_payment_error = null
    intent.latest_charge = charge.id
    intent.payment_method = paymentMethod
    session.status = 'complete'
    session.payment_status = 'paid'
    session.url = null
    session.customer_details = { email: session.customer_email, name: null, phone: null, address: null, tax_exempt: 'none', tax_ids: [] }
    const event = emit('checkout.session.completed', session)
    return { session, paymentIntent: intent, charge, event }
  }

  /** The card is declined: the session stays open and `payment_intent.payment_failed` is emitted. */
  function declineSession(id: string) {
    const session = getSession(id)
    assertOpen(session)
    const intent = intentFor(session)
    const paymentMethod = makeId('pm_')
    const charge = newCharge(intent, session, false, paymentMethod)
    intent.status = 'requires_payment_method'
    intent.latest_charge = charge.id
    intent.payment_method = null
    intent.last_payment_error = {
      type: 'card_error',
      code: 'card_declined',
      decline_code: 'generic_decline',
      doc_url: null,
      message: 'Your card was declined.',
      charge: charge.id,
      payment_method: { id: paymentMethod, object: 'payment_method', type: 'card', card: { brand: 'visa', last4: '0002' } },
    }
    const event = emit('payment_intent.payment_failed', intent)
    return { session, paymentIntent: intent, charge, event }
  }

  function getPaymentIntent(id: string) {
    const intent = paymentIntents.get(id)
    if (!intent) throw notFound('payment_intent', id, 'intent')
    return intent
  }

  function getCharge(id: string) {
    const charge = charges.get(id)
    if (!charge) throw notFound('charge', id, 'charge')
    return charge
  }

  function refundsOf(chargeId: string) {
    return newestFirst(refunds).filter(refund => refund.charge === chargeId)
  }

  function chargeWithRefunds(charge: Charge): Charge {
    const list = refundsOf(charge.id)
    return { ...structuredClone(charge), refunds: { object: 'list', data: structuredClone(list), has_more: false, total_count: list.length, url: `/v1/charges/${charge.id}/refunds` } }
  }

  function createRefund(params: Params, request: RequestInfo) {
    rejectUnknown(params, REFUND_CREATE_PARAMS)
    const intentId = readString(params.payment_intent, 'payment_intent')
    const chargeId = readString(params.charge, 'charge')
    if (!intentId && !chargeId) throw invalid('One of the following params should be provided for this request: payment_intent or charge.', 'payment_intent', 'parameter_missing')
    const amount = readInteger(params.amount, 'amount', { min: 1 })
    const reason = readEnum(params.reason, 'reason', ['duplicate', 'fraudulent', 'requested_by_customer'] as const)
    const metadata = readMetadata(params.metadata) ?? {}

    let charge: Charge
    if (chargeId) {
      charge = charges.get(chargeId) ?? (() => {
        throw notFound('charge', chargeId, 'charge')
      })()
      if (intentId && charge.payment_intent !== intentId) {
        throw invalid(`The charge ${chargeId} does not belong to the PaymentIntent ${intentId}.`, 'charge')
      }
    }
    else {
      const intent = paymentIntents.get(intentId!)
      if (!intent) throw notFound('payment_intent', intentId!, 'payment_intent')
      const latest = intent.latest_charge ? charges.get(intent.latest_charge) : undefined
      if (intent.status !== 'succeeded' || !latest) {
        throw invalid(`This PaymentIntent (${intent.id}) does not have a successful charge to refund.`, 'payment_intent', 'charge_not_refundable', false)
      }
      charge = latest
    }
    if (charge.status !== 'succeeded') throw invalid(`Charge ${charge.id} did not succeed and cannot be refunded.`, 'charge', 'charge_not_refundable', false)
    if (charge.refunded) throw invalid(`Charge ${charge.id} has already been refunded.`, undefined, 'charge_already_refunded', false)
    const remaining = charge.amount - charge.amount_refunded
    const refundAmount = amount ?? remaining
    if (refundAmount > remaining) {
      const show = (value: number) => formatMinor(value, charge.currency)
      throw invalid(`Refund amount (${show(refundAmount)}) is greater than unrefunded amount on charge (${show(remaining)})`, 'amount', undefined, false)
    }

    const previous = { amount_refunded: charge.amount_refunded, refunded: charge.refunded }
    const refund: Refund = {
      id: makeId('re_3'),
      object: 'refund',
      amount: refundAmount,
      balance_transaction: makeId('txn_3'),
      charge: charge.id,
      created: unixNow(),
      currency: charge.currency,
      metadata,
      payment_intent: charge.payment_intent,
      reason: reason ?? null,
      receipt_number: null,
      status: nextRefundPending ? 'pending' : 'succeeded',
    }
    nextRefundPending = false
    refunds.set(refund.id, refund)
    charge.amount_refunded += refundAmount
    charge.refunded = charge.amount_refunded >= charge.amount
    const changed: Record<string, unknown> = { amount_refunded: previous.amount_refunded }
    if (previous.refunded !== charge.refunded) changed.refunded = previous.refunded
    const event = emit('charge.refunded', chargeWithRefunds(charge), request, changed)
    return { refund, charge, event }
  }

  /** Test control: the next refund created starts as `pending`. */
  function holdNextRefund(pending = true) {
    nextRefundPending = pending
  }

  /**
   * Test control: a refund fails (a closed card account, say). The money is back on the charge, and
   * `charge.refund.updated` carries the refund with its new status.
   */
  function failRefund(id: string) {
    const refund = getRefund(id)
    if (refund.status === 'failed' || refund.status === 'canceled') throw invalid(`Refund ${id} has already ${refund.status}.`, undefined, undefined, false)
    const previousStatus = refund.status
    refund.status = 'failed'
    const charge = charges.get(refund.charge)
    if (charge) {
      charge.amount_refunded = Math.max(0, charge.amount_refunded - refund.amount)
      charge.refunded = charge.amount_refunded >= charge.amount
    }
    const event = emit('charge.refund.updated', refund, NO_REQUEST, { status: previousStatus })
    return { refund, event }
  }

  function getRefund(id: string) {
    const refund = refunds.get(id)
    if (!refund) throw notFound('refund', id, 'refund')
    return refund
  }

  function getEvent(id: string) {
    const event = events.get(id)
    if (!event) throw notFound('event', id, 'id')
    return event
  }

  /** Looks an object up by its id, whatever its kind (for `expand`). */
  function resolve(id: string): unknown {
    return sessions.get(id) ?? paymentIntents.get(id) ?? charges.get(id) ?? refunds.get(id) ?? events.get(id)
  }

  /** Fields that appear only when expanded. */
  function computed(owner: Params, field: string): unknown {
    if (owner.object === 'checkout.session' && field === 'line_items' && typeof owner.id === 'string') {
      const data = lineItemsOf(owner.id).map(publicLineItem)
      return { object: 'list', data, has_more: false, url: `/v1/checkout/sessions/${owner.id}/line_items` }
    }
    if (owner.object === 'charge' && field === 'refunds' && typeof owner.id === 'string') {
      const data = refundsOf(owner.id)
      return { object: 'list', data, has_more: false, total_count: data.length, url: `/v1/charges/${owner.id}/refunds` }
    }
    return undefined
  }

  return {
    sessions,
    paymentIntents,
    charges,
    refunds,
    events,
    newestFirst,
    reset,
    emit,
    createSession,
    getSession,
    lineItemsOf,
    publicLineItem,
    expireSession,
    sweepExpired,
    completeSession,
    declineSession,
    getPaymentIntent,
    getCharge,
    chargeWithRefunds,
    createRefund,
    holdNextRefund,
    failRefund,
    getRefund,
    getEvent,
    resolve,
    computed,
  }
}

export type FakeState = ReturnType<typeof createState>

function formatMinor(amount: number, currency: string) {
  try {
    const format = new Intl.NumberFormat('en-US', { style: 'currency', currency: currency.toUpperCase() })
    const digits = format.resolvedOptions().maximumFractionDigits ?? 2
    return format.format(amount / 10 ** digits)
  }
  catch {
    return `${amount} ${currency}`
  }
}
