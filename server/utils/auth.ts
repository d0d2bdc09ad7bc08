import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import type { SessionUser, UserRole } from '#shared/types/auth'
import { users } from '../db/schema'

declare module '#auth-utils' {
  interface User {
    id: number
  }
  interface UserSession {
    sessionVersion?: number
  }
}

/**
 * The signed-in user, read fresh from the database on every request: the cookie carries only the
 * id and the session version, so a role change or password change takes effect at once.
 */
export async function currentUser(event: H3Event): Promise<SessionUser | null> {
  if (event.context.currentUser !== undefined) return event.context.currentUser
  const session = await getUserSession(event)
  let found: SessionUser | null = null
  if (session.user?.id) {
    const db = await useDB()
    const [row] = await db.select().from(users).where(eq(users.id, session.user.id)).limit(1)
    if (row && row.sessionVersion === session.sessionVersion) {
      found = { id: row.id, email: row.email, name: row.name, role: row.role }
    }
    else {
      await clearUserSession(event)
    }
  }
  event.context.currentUser = found
  return found
}

/** 401 when nobody is signed in, 403 when the signed-in user's role is not among `roles`. */
export async function requireRole(event: H3Event, ...roles: UserRole[]): Promise<SessionUser> {
  const user = await currentUser(event)
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Please sign in first.' })
  if (roles.length > 0 && !roles.includes(user.role)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Your account may not do this.' })
  }
  return user
}

export async function signIn(event: H3Event, user: { id: number, sessionVersion: number }) {
  await replaceUserSession(event, { user: { id: user.id }, sessionVersion: user.sessionVersion })
  event.context.currentUser = undefined
}

declare module 'h3' {
  interface H3EventContext {
    currentUser?: SessionUser | null
  }
}
