import { sql } from 'drizzle-orm'
import { blanks, recorders, settings, users } from '../db/schema'
import { hashPassword } from '#imports'
import { defaultEngineSettings } from '#shared/utils/engineSettings'
import { demoAccounts } from '#shared/utils/demoAccounts'
import { shopProfileSchema } from '#shared/utils/shopProfile'
import type { Database } from '../utils/platform/db'
import { refreshBlankStock } from '../utils/shop/blankStock'
import { productCount, seedDemoCatalogue } from './catalogue'
import { seedDemoTickets } from './tickets'
import { seedDemoWorkshop } from './workshop'

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
  await seedDemoWorkshop(db)
  await seedDemoTickets(db)
  // The demo's blank products sell what the register holds: its free, passed blanks of each format and wax.
  await db.transaction(tx => refreshBlankStock(tx))
}

export async function seedIfEmpty(db: Database) {
  const [row] = await db.select({ count: sql<number>`count(*)::int` }).from(users)
  if ((row?.count ?? 0) === 0) {
    await seedDemo(db)
    return
  }
  // A database from before an area existed gets that area's demo once, while the area is empty.
  if (await productCount(db) === 0) await seedDemoCatalogue(db)
  const [blank] = await db.select({ id: blanks.id }).from(blanks).limit(1)
  if (!blank) await seedDemoWorkshop(db)
  const [recorder] = await db.select({ id: recorders.id }).from(recorders).limit(1)
  if (!recorder) await seedDemoTickets(db)
  await db.transaction(tx => refreshBlankStock(tx))
}
