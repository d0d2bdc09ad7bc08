/** A 404 with a sentence a person understands; another customer's things are "not found" too. */
export function notFoundError(message: string) {
  return createError({ statusCode: 404, statusMessage: 'Not found', message })
}

/** A 409: the request was understood, but the thing is not in a state that allows it now. */
export function conflictError(message: string, data?: Record<string, unknown>) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', message, ...(data ? { data } : {}) })
}

type DatabaseErrorShape = { code?: string, constraint?: string, message?: string, cause?: unknown }

/**
 * Whether a database error is a unique-index violation (SQLSTATE 23505), of `constraint` when one is
 * named; drivers and Drizzle wrap the server's error in one or more `cause`s, so all are looked at.
 */
export function isUniqueViolation(error: unknown, constraint?: string): boolean {
  for (let cause = error as DatabaseErrorShape | undefined; cause; cause = cause.cause as DatabaseErrorShape | undefined) {
    if (cause.code === '23505' && (constraint === undefined || `${cause.constraint ?? ''} ${cause.message ?? ''}`.includes(constraint))) return true
  }
  return false
}

/** `%text%` for ILIKE, with the text's own %, _ and \ taken literally. */
export function containsPattern(text: string): string {
  return `%${text.replace(/[%_\\]/g, ch => `\\${ch}`)}%`
}
