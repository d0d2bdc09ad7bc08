/** GET /api/guides (anyone): every guide's address, title and summary, for the guides page. */
export default defineEventHandler(async () => {
  return { guides: await listGuides() }
})
