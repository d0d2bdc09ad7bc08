// Whether the shop still needs its first maker (the /setup page asks before showing its form).
export default defineEventHandler(async () => {
  return { needed: !(await makerExists(await useDB())) }
})
