// Opens the database (and migrates it) as the server starts, seeds the demo when asked, and runs the
// mail outbox loop. Nitro does not await plugins, so routes still go through the shared useDB() promise.
import { seedIfEmpty } from '../demo'

export default defineNitroPlugin((nitroApp) => {
  const config = useRuntimeConfig()
  let timer: ReturnType<typeof setTimeout> | undefined
  let stopped = false

  const loop = async () => {
    const startedAt = performance.now()
    try {
      // With several app instances on one PostgreSQL server, one delivers at a time (the others skip the pass).
      const done = await withInstanceLock('mail', async () => {
        const requeued = await requeueInterruptedMail()
        return { requeued, ...await deliverDueMail() }
      }, { wait: false })
      if (!done) logJob('mail', startedAt, { skipped: 'another instance is delivering' }, { idle: true })
      else logJob('mail', startedAt, done, { idle: done.sent + done.failed + done.requeued === 0 })
    }
    catch (error) {
      logJob('mail', startedAt, { error: error instanceof Error ? error.message : String(error) })
    }
    if (!stopped) timer = setTimeout(loop, Number(config.mailPollMs))
  }

  let sweepTimer: ReturnType<typeof setInterval> | undefined
  // Each sweep logs one line a run: what it released or sent, or why it failed.
  const sweepJob = async (job: string, run: () => Promise<number>, counted: string) => {
    const startedAt = performance.now()
    try {
      logJob(job, startedAt, { [counted]: await run() })
    }
    catch (error) {
      logJob(job, startedAt, { error: error instanceof Error ? error.message : String(error) })
    }
  }
  const sweep = () => Promise.all([
    sweepJob('reservation-sweep', () => sweepExpiredReservations(), 'released'),
    // One reminder for each proof left waiting too long (conditional, so two servers send it once).
    sweepJob('proof-reminders', () => sendProofReminders(), 'sent'),
  ])

  const startedAt = performance.now()
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
  starting.then(() => logJob('start-up', startedAt, { database: process.env.DATABASE_URL ? 'server' : 'embedded' }), (error) => {
    logJob('start-up', startedAt, { error: error instanceof Error ? error.message : String(error) })
  })

  nitroApp.hooks.hook('close', async () => {
    stopped = true
    if (timer) clearTimeout(timer)
    if (sweepTimer) clearInterval(sweepTimer)
    await starting.catch(() => undefined)
    await closeDB()
  })
})
