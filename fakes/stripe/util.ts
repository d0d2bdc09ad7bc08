// Small helpers for the Stripe stand-in: ids, the real error shape, reading form-encoded parameters,
// list objects and `expand`.
import { randomBytes } from 'node:crypto'

export type Json = null | boolean | number | string | Json[] | { [key: string]: Json }
export type JsonObject = { [key: string]: Json }
export type Params = Record<string, unknown>

export const unixNow = () => Math.floor(Date.now() / 1000)

const ALPHABET = 'abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789'

/** A random id with the real prefixes (`cs_test_`, `pi_`, `ch_`, `re_`, `evt_`, `req_` …). */
export function makeId(prefix: string, length = 24) {
  const bytes = randomBytes(length)
  let out = ''
  for (const byte of bytes) out += ALPHABET[byte % ALPHABET.length]
  return `${prefix}${out}`
}

export interface StripeErrorBody {
  type: 'invalid_request_error' | 'idempotency_error' | 'api_error' | 'card_error'
  message: string
  param?: string
  code?: string
  doc_url?: string | null
  request_log_url?: string
}

/** An error answered with the real shape `{ error: { type, message, param?, code? } }`. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly body: StripeErrorBody,
    /** Failed validation before the endpoint started: the real API keeps no idempotent result for these. */
    readonly validation = false,
  ) {
    super(body.message)
  }
}

// The real service links each error code to its documentation; the stand-in has none to link to.
const docUrl = (_code: string): null => null

export function invalid(message: string, param?: string, code?: string, validation = true) {
  return new ApiError(400, {
    type: 'invalid_request_error',
    message,
    ...(param ? { param } : {}),
    ...(code ? { code, doc_url: docUrl(code) } : {}),
  }, validation)
}

export const missing = (param: string) => invalid(`Missing required param: ${param}.`, param, 'parameter_missing')

export const unknownParam = (param: string) => invalid(`Received unknown parameter: ${param}`, param, 'parameter_unknown')

export const notFound = (kind: string, id: string, param = 'id') => new ApiError(404, {
  type: 'invalid_request_error',
  code: 'resource_missing',
  doc_url: docUrl('resource_missing'),
  message: `No such ${kind}: '${id}'`,
  param,
})

export const unrecognisedUrl = (method: string, path: string) => new ApiError(404, {
  type: 'invalid_request_error',
  message: `Unrecognized request URL (${method}: ${path}). The local payment stand-in speaks only the subset the shop uses.`,
})

/** Names a nested parameter the way the API does: `line_items[0][price_data][currency]`. */
export const paramName = (...parts: (string | number)[]) => parts.map((part, index) => index === 0 ? String(part) : `[${part}]`).join('')

/** Refuses parameters the endpoint does not know, as the real API does. */
export function rejectUnknown(params: Params, allowed: readonly string[], prefix?: string) {
  for (const key of Object.keys(params)) {
    if (!allowed.includes(key)) throw unknownParam(prefix ? `${prefix}[${key}]` : key)
  }
}

export function isObject(value: unknown): value is Params {
  return typeof value === 'object' && value !== null && !Array.isArray(value)
}

export function readString(value: unknown, param: string, options: { required?: boolean, max?: number } = {}) {
  if (value === undefined || value === '') {
    if (options.required) throw missing(param)
    return undefined
  }
  if (typeof value !== 'string') throw invalid(`Invalid string: ${JSON.stringify(value)}`, param, 'parameter_invalid_string')
  if (options.max && value.length > options.max) {
    throw invalid(`Invalid string: ${value.slice(0, 20)}...; must be at most ${options.max} characters`, param, 'string_length_exceeds_maximum')
  }
  return value
}

export function readInteger(value: unknown, param: string, options: { required?: boolean, min?: number, max?: number } = {}) {
  if (value === undefined || value === '') {
    if (options.required) throw missing(param)
    return undefined
  }
  if (typeof value === 'number' && Number.isInteger(value)) return checkRange(value, param, options)
  if (typeof value !== 'string' || !/^-?\d+$/.test(value)) {
    throw invalid(`Invalid integer: ${typeof value === 'string' ? value : JSON.stringify(value)}`, param, 'parameter_invalid_integer')
  }
  return checkRange(Number(value), param, options)
}

function checkRange(value: number, param: string, options: { min?: number, max?: number }) {
  if (!Number.isSafeInteger(value)) throw invalid(`Invalid integer: ${value}`, param, 'parameter_invalid_integer')
  if (options.min !== undefined && value < options.min) {
    throw invalid(`This value must be greater than or equal to ${options.min}.`, param, 'parameter_invalid_integer')
  }
  if (options.max !== undefined && value > options.max) {
    throw invalid(`This value must be less than or equal to ${options.max}.`, param, 'parameter_invalid_integer')
  }
  return value
}

export function readBoolean(value: unknown, param: string) {
  if (value === undefined || value === '') return undefined
  if (value === 'true' || value === true) return true
  if (value === 'false' || value === false) return false
  throw invalid(`Invalid boolean: ${String(value)}`, param, 'parameter_invalid_boolean')
}

export function readEnum<T extends string>(value: unknown, param: string, choices: readonly T[], options: { required?: boolean } = {}) {
  const text = readString(value, param, options)
  if (text === undefined) return undefined
  if (!choices.includes(text as T)) {
    throw invalid(`Invalid ${param}: must be one of ${choices.join(', ')}`, param, 'parameter_invalid_string')
  }
  return text as T
}

/** qs gives an array for `a[0]=…`, or an object with numeric keys when indices are sparse or large. */
export function readArray(value: unknown, param: string): unknown[] | undefined {
  if (value === undefined || value === '') return undefined
  if (Array.isArray(value)) return value
  if (isObject(value) && Object.keys(value).every(key => /^\d+$/.test(key))) {
    return Object.keys(value).sort((a, b) => Number(a) - Number(b)).map(key => value[key])
  }
  throw invalid(`Invalid array`, param, 'parameter_invalid_array')
}

export function readObject(value: unknown, param: string): Params | undefined {
  if (value === undefined || value === '') return undefined
  if (!isObject(value)) throw invalid(`Invalid object`, param, 'parameter_invalid_object')
  return value
}

/** Metadata: up to 50 keys, keys up to 40 characters, string values up to 500 characters. */
export function readMetadata(value: unknown, param = 'metadata'): Record<string, string> | undefined {
  if (value === undefined) return undefined
  if (value === '') return {}
  if (!isObject(value)) throw invalid('Invalid object', param, 'parameter_invalid_object')
  const out: Record<string, string> = {}
  const keys = Object.keys(value)
  if (keys.length > 50) throw invalid('Metadata can have up to 50 keys.', param)
  for (const key of keys) {
    const item = value[key]
    if (key.length > 40) throw invalid(`Metadata keys can be at most 40 characters long (${key}).`, paramName(param, key))
    if (typeof item !== 'string') throw invalid(`Invalid string: ${JSON.stringify(item)}`, paramName(param, key), 'parameter_invalid_string')
    if (item.length > 500) throw invalid(`Metadata values can have up to 500 characters, but you passed in a value that is ${item.length} characters.`, paramName(param, key))
    if (item !== '') out[key] = item
  }
  return out
}

export interface StripeList<T> {
  object: 'list'
  data: T[]
  has_more: boolean
  url: string
}

/**
 * A list page: `items` newest first; `limit` 1–100 (default 10), `starting_after` / `ending_before` cursors.
 */
export function listPage<T extends { id: string }>(items: T[], params: Params, url: string): StripeList<T> {
  const limit = readInteger(params.limit, 'limit', { min: 1, max: 100 }) ?? 10
  const after = readString(params.starting_after, 'starting_after')
  const before = readString(params.ending_before, 'ending_before')
  let data: T[]
  let hasMore: boolean
  if (after) {
    const index = items.findIndex(item => item.id === after)
    if (index < 0) throw invalid(`No such object: '${after}'`, 'starting_after', 'resource_missing')
    const rest = items.slice(index + 1)
    data = rest.slice(0, limit)
    hasMore = rest.length > limit
  }
  else if (before) {
    const index = items.findIndex(item => item.id === before)
    if (index < 0) throw invalid(`No such object: '${before}'`, 'ending_before', 'resource_missing')
    const rest = items.slice(0, index)
    data = rest.slice(Math.max(0, rest.length - limit))
    hasMore = rest.length > limit
  }
  else {
    data = items.slice(0, limit)
    hasMore = items.length > limit
  }
  return { object: 'list', data, has_more: hasMore, url }
}

/** `created` filters: `created=…` or `created[gt|gte|lt|lte]=…`. */
export function createdFilter(value: unknown): (created: number) => boolean {
  if (value === undefined || value === '') return () => true
  if (typeof value === 'string') {
    const exact = readInteger(value, 'created')
    return created => created === exact
  }
  const range = readObject(value, 'created') ?? {}
  rejectUnknown(range, ['gt', 'gte', 'lt', 'lte'], 'created')
  const gt = readInteger(range.gt, 'created[gt]')
  const gte = readInteger(range.gte, 'created[gte]')
  const lt = readInteger(range.lt, 'created[lt]')
  const lte = readInteger(range.lte, 'created[lte]')
  return created => (gt === undefined || created > gt) && (gte === undefined || created >= gte)
    && (lt === undefined || created < lt) && (lte === undefined || created <= lte)
}

export const LIST_PARAMS = ['limit', 'starting_after', 'ending_before', 'expand', 'created'] as const

export function readExpand(params: Params): string[] {
  const list = readArray(params.expand, 'expand') ?? []
  return list.map((item, index) => {
    const path = readString(item, paramName('expand', index), { required: true })!
    if (path.split('.').length > 4) throw invalid(`You cannot expand more than 4 levels of a property. Property: ${path}`, 'expand')
    return path
  })
}

/**
 * Expands dotted paths on a clone of `root`: an id string is replaced by the object it names (looked up
 * with `resolve`); `data` walks into the items of a list; `computed` supplies fields that exist only when
 * expanded (a session's `line_items`, a charge's `refunds`).
 */
export function expandPaths(
  root: unknown,
  paths: string[],
  resolve: (id: string) => unknown,
  computed: (owner: Params, field: string) => unknown,
) {
  const copy = structuredClone(root)
  for (const path of paths) expandOne(copy, path.split('.'), path, resolve, computed)
  return copy
}

function expandOne(node: unknown, segments: string[], path: string, resolve: (id: string) => unknown, computed: (owner: Params, field: string) => unknown) {
  if (!isObject(node) || segments.length === 0) return
  const [field, ...rest] = segments as [string, ...string[]]
  if (node.object === 'list' && field === 'data' && Array.isArray(node.data)) {
    for (const item of node.data) expandOne(item, rest, path, resolve, computed)
    return
  }
  const extra = computed(node, field)
  if (extra !== undefined) node[field] = extra
  const value = node[field]
  if (value === null) return
  if (typeof value === 'string') {
    const found = resolve(value)
    if (found === undefined) throw invalid(`This property cannot be expanded (${path}).`, 'expand')
    node[field] = structuredClone(found)
  }
  else if (!isObject(value)) {
    throw invalid(`This property cannot be expanded (${path}).`, 'expand')
  }
  expandOne(node[field], rest, path, resolve, computed)
}

/** Deterministic JSON for comparing two requests' parameters (idempotency). */
export function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`
  if (isObject(value)) return `{${Object.keys(value).sort().map(key => `${JSON.stringify(key)}:${canonical(value[key])}`).join(',')}}`
  return JSON.stringify(value) ?? 'null'
}

/** Minor units → a display amount, honouring zero-decimal currencies through Intl. */
export function formatAmount(amount: number, currency: string, locale = 'en-GB') {
  const format = new Intl.NumberFormat(locale, { style: 'currency', currency: currency.toUpperCase() })
  const digits = format.resolvedOptions().maximumFractionDigits ?? 2
  return format.format(amount / 10 ** digits)
}
