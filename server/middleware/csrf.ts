// State changes must come from our own pages: every non-GET request to the API carries an Origin
// of this site. Webhooks come from the payment service and are verified by signature instead.
const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  if (safeMethods.has(event.method)) return
  const path = event.path
  if (!path.startsWith('/api/') || path.startsWith('/api/webhooks/')) return
  const origin = getRequestHeader(event, 'origin')
  const host = getRequestHeader(event, 'host')
  let originHost: string | undefined
  try {
    originHost = origin ? new URL(origin).host : undefined
  }
  catch {
    originHost = undefined
  }
  const allowed = new URL(String(useRuntimeConfig(event).siteUrl)).host
  if (!originHost || (originHost !== host && originHost !== allowed)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'This request did not come from a page of this shop (Origin header missing or foreign).' })
  }
})
