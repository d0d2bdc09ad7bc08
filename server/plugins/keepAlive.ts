import type { Server } from 'node:http'

// Idle connections are kept 65 s instead of Node's 5 s. A client or proxy that reuses a connection (undici closes
// its own after 4 s, browsers after minutes, nginx upstream keepalive and cloud load balancers after 60 s) then never
// sends a request down one this server has just closed: under load that race showed as a dropped connection.
// headersTimeout stays above it, as Node requires.
const KEEP_ALIVE_MS = 65_000

export default defineNitroPlugin((nitroApp) => {
  let done = false
  nitroApp.hooks.hook('request', (event) => {
    if (done) return
    // The listening server is reachable from any of its sockets (`socket.server`); the entry does not expose it.
    const server = (event.node.req.socket as unknown as { server?: Server }).server
    if (!server || typeof server.keepAliveTimeout !== 'number') return
    server.keepAliveTimeout = KEEP_ALIVE_MS
    server.headersTimeout = Math.max(server.headersTimeout, KEEP_ALIVE_MS + 1_000)
    done = true
  })
})
