let startup: Promise<void> | undefined
let state: 'starting' | 'ready' | 'failed' = 'starting'
let failure: string | undefined

/** The server's start-up work (migrate, seed, requeue mail); the health route reports on it. */
export function trackStartup(work: Promise<void>) {
  startup = work
  state = 'starting'
  work.then(() => {
    state = 'ready'
  }, (error) => {
    state = 'failed'
    failure = error instanceof Error ? error.message : String(error)
  })
}

export function startupDone(): Promise<void> {
  return startup ?? Promise.resolve()
}

/** Where the start-up work stands: a load balancer sends nothing here until it is `ready`. */
export function startupState(): { state: 'starting' | 'ready' | 'failed', failure?: string } {
  if (!startup) return { state: 'ready' }
  return failure ? { state, failure } : { state }
}
