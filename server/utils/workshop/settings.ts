import { eq } from 'drizzle-orm'
import type { ZodType } from 'zod'
import { surfaceThresholdsSchema } from '../../audio'
import { settings } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

/** Each settings key has one zod schema; what is stored is re-validated on the way out, with defaults filled in. */
const settingSchemas = {
  shop: shopProfileSchema,
  engine: engineSettingsSchema,
  // The maker's limits for a surface test's verdict (server/audio/verdict.ts).
  surface: surfaceThresholdsSchema,
  // The units and locale people type and read in (shared/utils/units.ts); stored figures keep theirs.
  units: unitPreferencesSchema,
} satisfies Record<string, ZodType>

export type SettingKey = keyof typeof settingSchemas
type SettingValue<K extends SettingKey> = ReturnType<typeof settingSchemas[K]['parse']>

export async function getSetting<K extends SettingKey>(key: K, db?: Database | Transaction): Promise<SettingValue<K>> {
  const database = db ?? await useDB()
  const [row] = await database.select().from(settings).where(eq(settings.key, key)).limit(1)
  const parsed = settingSchemas[key].safeParse(row?.value ?? {})
  return (parsed.success ? parsed.data : settingSchemas[key].parse({})) as SettingValue<K>
}

export async function putSetting<K extends SettingKey>(key: K, value: unknown, userId: number | null, db?: Database | Transaction): Promise<SettingValue<K>> {
  const database = db ?? await useDB()
  const parsed = settingSchemas[key].parse(value) as SettingValue<K>
  await database.insert(settings).values({ key, value: parsed, updatedBy: userId })
    .onConflictDoUpdate({ target: settings.key, set: { value: parsed, updatedBy: userId, updatedAt: new Date() } })
  return parsed
}
