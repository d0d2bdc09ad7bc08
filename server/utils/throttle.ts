import { and, count, eq, gte, min } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { signInFailures } from '../db/schema'

const windowMs = 15 * 60 * 1000
const perAccountLimit = 5
// An address may be shared (an office, a household), so it gets more room than one account.
const perAddressLimit = 20

export function clientAddress(event: H3Event): string {
  return getRequestIP(event) ?? 'unknown'
}

async function failuresSince(column: typeof signInFailures.email | typeof signInFailures.address, value: string, since: Date) {
  const db = await useDB()
  const [row] = await db.select({ failures: count(), oldest: min(signInFailures.at) }).from(signInFailures)
    .where(and(eq(column, value), gte(signInFailures.at, since)))
  return { failures: row?.failures ?? 0, oldest: row?.oldest ?? null }
}

/** Throws 429 when this account or this address has failed too often in the last 15 minutes. */
export async function assertSignInAllowed(event: H3Event, email: string) {
  const since = new Date(Date.now() - windowMs)
  const byAccount = await failuresSince(signInFailures.email, email, since)
  const byAddress = await failuresSince(signInFailures.address, clientAddress(event), since)
  const blocked = byAccount.failures >= perAccountLimit ? byAccount : byAddress.failures >= perAddressLimit ? byAddress : null
  if (!blocked) return
  const oldest = blocked.oldest ? new Date(blocked.oldest).getTime() : Date.now()
  const minutes = Math.max(1, Math.ceil((oldest + windowMs - Date.now()) / 60_000))
  setResponseHeader(event, 'Retry-After', minutes * 60)
  throw createError({
    statusCode: 429,
    statusMessage: 'Too many attempts',
    message: `Too many failed sign-ins. For your safety, sign-in is paused for about ${minutes} minute${minutes === 1 ? '' : 's'}; you can also reset your password.`,
  })
}

export async function recordSignInFailure(event: H3Event, email: string) {
  const db = await useDB()
  await db.insert(signInFailures).values({ email, address: clientAddress(event) })
}

export async function clearSignInFailures(email: string) {
  const db = await useDB()
  await db.delete(signInFailures).where(eq(signInFailures.email, email))
}
