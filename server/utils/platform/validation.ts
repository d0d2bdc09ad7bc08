import type { H3Event } from 'h3'
import type { ZodType } from 'zod'

/** A 400 that names the field, so a form can put the message beside the right input. */
export function fieldError(field: string, message: string) {
  return createError({
    statusCode: 400,
    statusMessage: 'Invalid input',
    message: `${field}: ${message}`,
    data: { fields: { [field]: message } },
  })
}

/**
 * Characters that no form of ours sends and PostgreSQL cannot store in text (NUL) or that only hide
 * what a text says: the C0 controls but tab, line feed and carriage return, and DEL.
 */
// eslint-disable-next-line no-control-regex -- finding control characters is the point
const CONTROL_CHARACTER = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/

function controlCharacterName(text: string): string | undefined {
  const found = CONTROL_CHARACTER.exec(text)?.[0]
  return found === undefined ? undefined : `U+${found.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`
}

/** Deeper than any form of ours nests; a deeper body is refused before anything walks it. */
const MAX_INPUT_DEPTH = 32

/**
 * A 400 naming the first field (by its path, `address.line1`) whose text, or whose key, holds a
 * control character, or that nests deeper than MAX_INPUT_DEPTH. Every JSON body, query and route
 * parameter passes here before its schema. The walk keeps its own stack: JSON.parse takes nesting far
 * deeper than a recursive walk could follow.
 */
export function rejectControlCharacters(value: unknown, field = ''): void {
  const pending: { value: unknown, field: string, depth: number }[] = [{ value, field, depth: 0 }]
  for (let next = pending.pop(); next; next = pending.pop()) {
    const at = next.field || 'body'
    if (typeof next.value === 'string') {
      const name = controlCharacterName(next.value)
      if (name) throw fieldError(at, `contains a control character (${name}); type plain text`)
      continue
    }
    if (next.value === null || typeof next.value !== 'object') continue
    if (next.depth >= MAX_INPUT_DEPTH) throw fieldError(at, `nested more than ${MAX_INPUT_DEPTH} levels deep`)
    const entries = Array.isArray(next.value) ? next.value.map((item, index) => [String(index), item] as const) : Object.entries(next.value)
    for (const [key, item] of entries.reverse()) {
      const name = controlCharacterName(key)
      if (name) throw fieldError(at, `a field name contains a control character (${name})`)
      pending.push({ value: item, field: next.field ? `${next.field}.${key}` : key, depth: next.depth + 1 })
    }
  }
}

function zodFailure(issues: { path: PropertyKey[], message: string }[]) {
  const fields: Record<string, string> = {}
  for (const issue of issues) {
    const field = issue.path.map(String).join('.') || 'body'
    fields[field] ??= issue.message
  }
  const summary = Object.entries(fields).map(([field, message]) => `${field}: ${message}`).join('; ')
  return createError({ statusCode: 400, statusMessage: 'Invalid input', message: summary, data: { fields } })
}

export async function readBodyWith<T>(event: H3Event, schema: ZodType<T>): Promise<T> {
  let body: unknown
  try {
    body = await readBody(event)
  }
  catch {
    throw fieldError('body', 'the request body is not valid JSON')
  }
  rejectControlCharacters(body)
  const parsed = schema.safeParse(body ?? {})
  if (!parsed.success) throw zodFailure(parsed.error.issues)
  return parsed.data
}

export function queryWith<T>(event: H3Event, schema: ZodType<T>): T {
  const query = getQuery(event)
  rejectControlCharacters(query)
  const parsed = schema.safeParse(query)
  if (!parsed.success) throw zodFailure(parsed.error.issues)
  return parsed.data
}

export function paramsWith<T>(event: H3Event, schema: ZodType<T>): T {
  const params = event.context.params ?? {}
  rejectControlCharacters(params)
  const parsed = schema.safeParse(params)
  if (!parsed.success) throw zodFailure(parsed.error.issues)
  return parsed.data
}
