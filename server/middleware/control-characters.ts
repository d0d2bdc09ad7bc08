// A control character in an address (`/api/orders/%00`, `?q=%00`) is refused before any route reads
// it: PostgreSQL cannot store NUL, and no page of ours makes such an address. Bodies are checked by
// readBodyWith, multipart fields by their upload helpers.
export default defineEventHandler((event) => {
  if (!event.path.startsWith('/api/') && !event.path.startsWith('/files/')) return
  const [path = '', search = ''] = event.path.split('?', 2)
  for (const segment of path.split('/')) {
    let decoded: string
    try {
      decoded = decodeURIComponent(segment)
    }
    catch {
      throw fieldError('path', 'the address holds a broken %-escape')
    }
    rejectControlCharacters(decoded, 'path')
  }
  if (search) rejectControlCharacters(getQuery(event))
})
