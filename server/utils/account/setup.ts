// First start of a real shop (NUXT_SEED_DEMO=false): there is no maker yet, and nobody can become one
// through the site, since registration makes collectors. The server then holds a one-time setup code
// and prints a link with it; whoever has the server's log (the shop's owner) opens /setup and makes
// the maker account. Once any maker exists the setup route answers 409 for good.
import { randomBytes, timingSafeEqual } from 'node:crypto'
import { eq, sql } from 'drizzle-orm'
import { users } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

let code: string | null = null

/** The setup code: NUXT_SETUP_TOKEN when set (a launcher or a deployment may choose it), else a random one per process. */
export function setupCode(): string {
  code ??= process.env.NUXT_SETUP_TOKEN || randomBytes(18).toString('base64url')
  return code
}

export function setupCodeMatches(given: string): boolean {
  const expected = Buffer.from(setupCode())
  const candidate = Buffer.from(given)
  return expected.length === candidate.length && timingSafeEqual(expected, candidate)
}

export async function makerExists(db: Database | Transaction): Promise<boolean> {
  const [row] = await db.select({ id: users.id }).from(users).where(eq(users.role, 'maker')).limit(1)
  return Boolean(row)
}

/** At start: when the shop has no maker, print where to make one. */
export async function announceSetupIfNeeded(db: Database, siteUrl: string): Promise<void> {
  if (await makerExists(db)) return
  console.log(`[setup] This shop has no maker account yet. Make one at ${siteUrl}/setup#code=${setupCode()} (the link works until a maker exists).`)
}

/** Serialise setups: the check for a maker and the insert happen under one table lock. */
export async function lockUsersForSetup(tx: Transaction): Promise<void> {
  await tx.execute(sql`lock table ${users} in share row exclusive mode`)
}
