let startup: Promise<void> | undefined

/** The server's start-up work (migrate, seed, requeue mail); the health route waits for it. */
export function trackStartup(work: Promise<void>) {
  startup = work
}

export function startupDone(): Promise<void> {
  return startup ?? Promise.resolve()
}
