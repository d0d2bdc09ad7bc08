import type { H3Event } from 'h3'

/*
 * One log line per request, written when the answer has gone out (or the client went away): method, path
 * (secret-looking query values hidden), status, milliseconds, the signed-in user's id when the route
 * looked them up, and the order number or ticket id when the route names one.
 */
function subjectOf(event: H3Event): { order?: string, ticket?: number } {
  const params = event.context.params ?? {}
  const path = event.path.split('?')[0]!
  if (params.number && /^\/api\/(orders|dispatch|workshop\/orders)\//.test(path)) return { order: decodeURIComponent(params.number) }
  if (params.id && /^\/api\/workshop\/tickets\//.test(path) && /^\d+$/.test(params.id)) return { ticket: Number(params.id) }
  return {}
}

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('request', (event) => {
    // The error page's inner render is part of the request that failed: logged once, as that request.
    if (event.path.startsWith('/__nuxt_error')) return
    const startedAt = performance.now()
    const res = event.node.res
    let logged = false
    const done = () => {
      if (logged) return
      logged = true
      const user = event.context.currentUser as { id: number } | null | undefined
      useLog().info('request', {
        method: event.method,
        path: loggedPath(event.path),
        status: res.writableFinished ? res.statusCode : 499,
        ms: Math.round(performance.now() - startedAt),
        user: user?.id,
        ...subjectOf(event),
      })
    }
    res.once('finish', done)
    res.once('close', done)
  })
})
