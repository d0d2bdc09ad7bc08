// Opens the database (and migrates it) as the server starts, seeds the demo when asked, and runs the
// mail outbox loop. Nitro does not await plugins, so routes still go through the shared useDB() promise.
import { seedIfEmpty } from '../demo'

export default defineNitroPlugin((nitroApp) => {
  const config = useRuntimeConfig()
  let timer: ReturnType<typeof setTimeout> | undefined
  let stopped = false

  const loop = async () => {
    try {
      // With several app instances on one PostgreSQL server, one delivers at a time (the others skip the pass).
      await withInstanceLock('mail', async () => {
        await requeueInterruptedMail()
        await deliverDueMail()
      }, { wait: false })
    }
    catch (error) {
      console.error('[mail] outbox pass failed:', error instanceof Error ? error.message : error)
    }
    if (!stopped) timer = setTimeout(loop, Number(config.mailPollMs))
  }

  let sweepTimer: ReturnType<typeof setInterval> | undefined
  const sweep = () => Promise.all([
    sweepExpiredReservations().catch((error) => {
      console.error('[checkout] reservation sweep failed:', error instanceof Error ? error.message : error)
    }),
    // One reminder for each proof left waiting too long (conditional, so two servers send it once).
    sendProofReminders().catch((error) => {
      console.error('[messages] proof reminder sweep failed:', error instanceof Error ? error.message : error)
    }),
  ])

  const starting = (async () => {
    const db = await useDB()
    // NUXT_SEED_DEMO (runtime config), or SEED_DEMO when that is not set.
    const seedDemo = process.env.NUXT_SEED_DEMO === undefined && process.env.SEED_DEMO !== undefined ? process.env.SEED_DEMO : String(config.seedDemo)
    if (seedDemo !== 'false') await withInstanceLock('seed', () => seedIfEmpty(db))
    await announceSetupIfNeeded(db, String(config.siteUrl))
    await requeueInterruptedMail()
    backupToken()
    if (!stopped) timer = setTimeout(loop, 200)
    if (!stopped) sweepTimer = setInterval(sweep, 60_000)
  })()
  trackStartup(starting)
  starting.catch((error) => {
    console.error('[db] start-up failed:', error)
  })

  nitroApp.hooks.hook('close', async () => {
    stopped = true
    if (timer) clearTimeout(timer)
    if (sweepTimer) clearInterval(sweepTimer)
    await starting.catch(() => undefined)
    await closeDB()
  })
})
