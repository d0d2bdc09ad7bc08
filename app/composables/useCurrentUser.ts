import type { SessionUser } from '#shared/types/auth'

/** Who is signed in, as the server last said; `undefined` until asked. Only for showing things: the server decides. */
export function useCurrentUser() {
  return useState<SessionUser | null | undefined>('current-user', () => undefined)
}

export async function loadCurrentUser(force = false): Promise<SessionUser | null> {
  const user = useCurrentUser()
  if (user.value !== undefined && !force) return user.value
  const requestFetch = useRequestFetch()
  user.value = await requestFetch<SessionUser>('/api/auth/me').catch(() => null)
  return user.value
}

export function homeFor(user: SessionUser | null): string {
  if (!user) return '/'
  if (user.role === 'maker') return '/workshop'
  if (user.role === 'shipper') return '/dispatch'
  return '/account'
}

/**
 * Whether the cart and the customer's ways in are shown: to visitors and collectors. The workshop's maker and
 * shipper buy nothing here, so their header, home page and cylinder pages carry no cart and no sign-up.
 */
export function shopsHere(user: SessionUser | null | undefined): boolean {
  return !user || user.role === 'collector'
}
