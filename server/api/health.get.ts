import { sql } from 'drizzle-orm'
import type { H3Event } from 'h3'

/*
 * GET /api/health: 200 `{ ok: true }` once the database is open, migrated and (when asked) seeded, and
 * answers a query; 503 with what is missing until then, so a launcher or a load balancer waits for it and
 * stops sending here when the database goes away. Nothing personal, no cache.
 */
const unavailable = (event: H3Event, body: Record<string, unknown>) => {
  setResponseStatus(event, 503, 'Service Unavailable')
  setResponseHeader(event, 'Retry-After', 2)
  return { ok: false, ...body }
}

export default defineEventHandler(async (event) => {
  const { state, failure } = startupState()
  if (state !== 'ready') return unavailable(event, { startup: state, ...(failure ? { reason: 'start-up failed; see the server log' } : {}) })
  try {
    const db = await useDB()
    await db.execute(sql`select 1`)
  }
  catch {
    return unavailable(event, { startup: state, database: 'not answering' })
  }
  return { ok: true }
})
