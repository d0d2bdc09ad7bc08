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
  const parsed = schema.safeParse(body ?? {})
  if (!parsed.success) throw zodFailure(parsed.error.issues)
  return parsed.data
}

export function queryWith<T>(event: H3Event, schema: ZodType<T>): T {
  const parsed = schema.safeParse(getQuery(event))
  if (!parsed.success) throw zodFailure(parsed.error.issues)
  return parsed.data
}

export function paramsWith<T>(event: H3Event, schema: ZodType<T>): T {
  const parsed = schema.safeParse(event.context.params ?? {})
  if (!parsed.success) throw zodFailure(parsed.error.issues)
  return parsed.data
}
