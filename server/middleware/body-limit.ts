// JSON bodies are read whole into memory, so their size is capped before anything reads them.
// Multipart uploads are checked by their own routes against each kind of file's limit.
const jsonLimitBytes = 16 * 1024 * 1024
const bodyMethods = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

export default defineEventHandler((event) => {
  if (!bodyMethods.has(event.method) || !event.path.startsWith('/api/')) return
  if (String(getRequestHeader(event, 'content-type') ?? '').startsWith('multipart/form-data')) return
  const declared = getRequestHeader(event, 'content-length')
  if (declared === undefined) {
    if (getRequestHeader(event, 'transfer-encoding')) {
      throw createError({ statusCode: 411, statusMessage: 'Length required', message: 'Send the body with a Content-Length.' })
    }
    return
  }
  if (Number(declared) > jsonLimitBytes) {
    throw createError({ statusCode: 413, statusMessage: 'Too large', message: `body: at most ${jsonLimitBytes / 1024 / 1024} MB.` })
  }
})
