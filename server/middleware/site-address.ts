// Runs after control-characters.ts (middleware run in file-name order), so the path it repeats is clean.
// The shop answers on one address, the one mailed links and payment returns use (runtimeConfig
// siteUrl). A page opened under another loopback name of the same port (127.0.0.1 for localhost, or
// the other way) is sent there before anything is set: the sign-in cookie and the cart belong to
// one host name, so a visitor who came in by the other would come back from the payment page
// signed out with the paid items still in the cart. Only page loads move; API calls, webhooks and
// files answer on either name.
const loopbackNames = new Set(['localhost', '127.0.0.1', '[::1]'])

export default defineEventHandler((event) => {
  if (event.method !== 'GET' && event.method !== 'HEAD') return
  if (event.path.startsWith('/api/') || !String(getRequestHeader(event, 'accept') ?? '').includes('text/html')) return
  const host = getRequestHeader(event, 'host')
  if (!host) return
  const canonical = new URL(String(useRuntimeConfig(event).siteUrl))
  if (host === canonical.host || !loopbackNames.has(canonical.hostname)) return
  let requested: URL
  try {
    requested = new URL(`http://${host}`)
  }
  catch {
    return
  }
  if (!loopbackNames.has(requested.hostname) || requested.port !== canonical.port) return
  // Joined as text: resolving the path against the origin would let `//elsewhere` leave the shop.
  return sendRedirect(event, `${canonical.origin}${event.node.req.url ?? '/'}`, 308)
})
