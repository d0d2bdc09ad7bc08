import { and, count, eq, gte, min, or } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { resetRequests, signInFailures } from '../../db/schema'

const signInWindowMs = 15 * 60 * 1000
const perAccountLimit = 5
// An address may be shared (an office, a household), so it gets more room than one account.
const perAddressLimit = 20

const resetWindowMs = 60 * 60 * 1000
const resetsPerEmail = 3
const resetsPerAddress = 20

/**
 * The client's network address. Behind a proxy or load balancer every request comes from the proxy,
 * so with NUXT_TRUST_PROXY=true the address the proxy puts in X-Forwarded-For is used instead (only
 * set it when a proxy you run sets that header; a client could otherwise choose its own).
 */
export function clientAddress(event: H3Event): string {
  const trustProxy = String(useRuntimeConfig().trustProxy) === 'true'
  return getRequestIP(event, { xForwardedFor: trustProxy }) ?? 'unknown'
}

type Log = typeof signInFailures | typeof resetRequests

async function eventsSince(log: Log, column: 'email' | 'address', value: string, since: Date) {
  const db = await useDB()
  const [row] = await db.select({ events: count(), oldest: min(log.at) }).from(log)
    .where(and(eq(log[column], value), gte(log.at, since)))
  return { events: row?.events ?? 0, oldest: row?.oldest ?? null }
}

/** The 429 for a window that is full, saying how long until its oldest event leaves it. */
function tooMany(event: H3Event, oldestAt: Date | string | null, windowMs: number, message: (wait: string) => string) {
  const oldest = oldestAt ? new Date(oldestAt).getTime() : Date.now()
  const minutes = Math.max(1, Math.ceil((oldest + windowMs - Date.now()) / 60_000))
  setResponseHeader(event, 'Retry-After', minutes * 60)
  return createError({ statusCode: 429, statusMessage: 'Too many attempts', message: message(`about ${minutes} minute${minutes === 1 ? '' : 's'}`) })
}

/** Which limit (if any) the account's and the address's events in the window break; `over` counts an event already logged. */
async function fullWindow(log: Log, event: H3Event, email: string, windowMs: number, limits: { email: number, address: number }, over = 0) {
  const since = new Date(Date.now() - windowMs)
  const byEmail = await eventsSince(log, 'email', email, since)
  if (byEmail.events >= limits.email + over) return byEmail
  const byAddress = await eventsSince(log, 'address', clientAddress(event), since)
  return byAddress.events >= limits.address + over ? byAddress : null
}

const signInPaused = (wait: string) => `Too many failed sign-ins. For your safety, sign-in is paused for ${wait}; you can also reset your password.`

// Attempts on one account run one after another in this process (a queue per e-mail), so the count an
// attempt starts from already holds the outcome of every earlier one: only failures need counting, and
// right passwords sent at the same moment never crowd each other out.
const accountQueues = new Map<string, Promise<void>>()

async function oneAtATime<T>(key: string, work: () => Promise<T>): Promise<T> {
  const run = (accountQueues.get(key) ?? Promise.resolve()).then(work)
  const settled = run.then(() => undefined, () => undefined)
  accountQueues.set(key, settled)
  try {
    return await run
  }
  finally {
    if (accountQueues.get(key) === settled) accountQueues.delete(key)
  }
}

/**
 * One sign-in under its limits: 429 when this account (5) or this address (20) failed too often in the
 * last 15 minutes; otherwise `check` (the password check, null when wrong) runs and its outcome is kept:
 * a failure stays logged, a success clears the account's failures.
 */
export async function throttledSignIn<T>(event: H3Event, email: string, check: () => Promise<T | null>): Promise<T | null> {
  return oneAtATime(email, async () => {
    const limits = { email: perAccountLimit, address: perAddressLimit }
    const full = await fullWindow(signInFailures, event, email, signInWindowMs, limits)
    if (full) throw tooMany(event, full.oldest, signInWindowMs, signInPaused)
    // Logged (pending) before the check and counted again: other servers on this database count the
    // attempt while it runs, and attempts they start at the same moment cannot all slip past the limit.
    const db = await useDB()
    const [logged] = await db.insert(signInFailures).values({ email, address: clientAddress(event), pending: true }).returning({ id: signInFailures.id })
    const over = await fullWindow(signInFailures, event, email, signInWindowMs, limits, 1)
    if (over) {
      // Others got in first: this attempt is refused unchecked, so it is not a failure.
      await db.delete(signInFailures).where(eq(signInFailures.id, logged!.id))
      throw tooMany(event, over.oldest, signInWindowMs, signInPaused)
    }
    // Should the check break off (a database error), the row stays pending and counted: it may have been a guess.
    const outcome = await check()
    if (outcome === null) {
      await db.update(signInFailures).set({ pending: false }).where(eq(signInFailures.id, logged!.id))
    }
    else {
      // Attempts still pending on other servers stay: each settles its own row.
      await db.delete(signInFailures).where(and(eq(signInFailures.email, email), or(eq(signInFailures.id, logged!.id), eq(signInFailures.pending, false))))
    }
    return outcome
  })
}

/** Forgets an account's settled failures (after a password reset, which proved the mailbox). */
export async function clearSignInFailures(email: string) {
  const db = await useDB()
  await db.delete(signInFailures).where(and(eq(signInFailures.email, email), eq(signInFailures.pending, false)))
}

/**
 * Password-reset requests: at most 3 an hour for one e-mail address (whether or not it has an
 * account, so the limit tells nothing about accounts) and 20 an hour from one network address (it may be a shared one).
 * Logs the request when it is allowed.
 */
export async function logResetRequest(event: H3Event, email: string): Promise<void> {
  const limits = { email: resetsPerEmail, address: resetsPerAddress }
  const tooManyResets = (oldest: Date | string | null) => tooMany(event, oldest, resetWindowMs, wait => `Too many reset requests for this address. Check your inbox (and spam folder) for the links already sent, or try again in ${wait}.`)
  const full = await fullWindow(resetRequests, event, email, resetWindowMs, limits)
  if (full) throw tooManyResets(full.oldest)
  // Logged first and counted again, as with sign-ins: requests sent all at once cannot slip past the limit.
  const db = await useDB()
  const [logged] = await db.insert(resetRequests).values({ email, address: clientAddress(event) }).returning({ id: resetRequests.id })
  const over = await fullWindow(resetRequests, event, email, resetWindowMs, limits, 1)
  if (over) {
    await db.delete(resetRequests).where(eq(resetRequests.id, logged!.id))
    throw tooManyResets(over.oldest)
  }
}
