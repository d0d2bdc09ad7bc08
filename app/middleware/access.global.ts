import type { UserRole } from '#shared/types/auth'

// Which signed-in roles may open each area. The server checks every request on its own; this only
// spares people a page they cannot use.
const areas: { prefix: string, roles: UserRole[] | 'any' }[] = [
  { prefix: '/workshop', roles: ['maker'] },
  { prefix: '/dispatch', roles: ['shipper', 'maker'] },
  { prefix: '/account', roles: 'any' },
]

export default defineNuxtRouteMiddleware(async (to) => {
  const area = areas.find(a => to.path === a.prefix || to.path.startsWith(`${a.prefix}/`))
  if (!area) return
  const user = await loadCurrentUser()
  if (!user) return navigateTo({ path: '/signin', query: { next: to.fullPath } })
  if (area.roles !== 'any' && !area.roles.includes(user.role)) {
    return abortNavigation(createError({ statusCode: 403, statusMessage: 'This part of the shop is not open to your account.' }))
  }
})
