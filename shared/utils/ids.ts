import { z } from 'zod'

/**
 * The largest value of a PostgreSQL `integer` (our `serial` ids). A larger number can name no row,
 * and sent to the database it is an "out of range" error (a 500), so every id a request carries is
 * checked against it here and refused with a 400 naming the field.
 */
export const DB_ID_MAX = 2_147_483_647

/**
 * A row id from a route, a query string, a multipart form or a JSON body: a whole number from 1 to
 * DB_ID_MAX. `missing` is the message for an absent or empty value (e.g. "choose a recorder").
 */
export function idField(name: string, missing = `${name} is required`) {
  return z
    .union([z.number(), z.string()], {
      error: issue => issue.input === undefined || issue.input === null ? missing : `${name} must be a number`,
    })
    .transform((raw, ctx) => {
      const fail = (message: string) => {
        ctx.addIssue({ code: 'custom', message })
        return z.NEVER
      }
      const text = typeof raw === 'string' ? raw.trim() : null
      if (text === '') return fail(missing)
      // Only plain digits in text: "1e3" or "0x10" are not what anyone types for an id.
      if (text !== null && !/^-?\d+$/.test(text)) return fail(`${name} must be a whole number, got "${raw}"`)
      const value = text === null ? (raw as number) : Number(text)
      if (!Number.isInteger(value)) return fail(`${name} must be a whole number`)
      if (value < 1) return fail(`${name} must be 1 or more`)
      if (value > DB_ID_MAX) return fail(`${name} must be at most ${DB_ID_MAX}: no record has a larger id`)
      return value
    })
}

/** `{ id }` from a route such as `/api/workshop/tickets/[id]`. */
export const idParamsSchema = z.object({ id: idField('id') })
