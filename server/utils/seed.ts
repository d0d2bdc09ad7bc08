import { sql } from 'drizzle-orm'
import { settings, users } from '../db/schema'
import type { Database } from './db'

/**
 * The invented demo workshop. Idempotent: every insert skips what is already there, so running it
 * twice changes nothing. Later areas add their own demo data here.
 */
export async function seedDemo(db: Database) {
  const shop = shopProfileSchema.parse({})
  const hashes = await Promise.all(demoAccounts.map(account => hashPassword(account.password)))
  await db.transaction(async (tx) => {
    await tx.insert(settings).values({ key: 'shop', value: shop }).onConflictDoNothing()
    await tx.insert(settings).values({ key: 'engine', value: defaultEngineSettings }).onConflictDoNothing()
    for (const [index, account] of demoAccounts.entries()) {
      await tx.insert(users).values({ email: account.email, name: account.name, role: account.role, passwordHash: hashes[index]! })
        .onConflictDoNothing()
    }
  })
  await seedDemoCatalogue(db)
}

export async function seedIfEmpty(db: Database) {
  const [row] = await db.select({ count: sql<number>`count(*)::int` }).from(users)
  if ((row?.count ?? 0) === 0) await seedDemo(db)
  // A database from before the catalogue existed gets the demo catalogue once, while it has no products.
  else if (await productCount(db) === 0) await seedDemoCatalogue(db)
}
