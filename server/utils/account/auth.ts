import { createHash, randomBytes } from 'node:crypto'
import type { H3Event } from 'h3'
import { and, eq, gt, isNull, lte } from 'drizzle-orm'
import type { SessionUser, UserRole } from '#shared/types/auth'
import { passwordResets, userSessions, users } from '../../db/schema'
import type { Database, Transaction } from '../platform/db'

declare module '#auth-utils' {
  interface User {
    id: number
  }
  interface SecureSessionData {
    // Under `secure` so that nuxt-auth-utils' /api/_auth/session never hands it to the page.
    sessionId?: string
  }
  interface UserSession {
    // When this cookie was last written (ms): it is written again, with a fresh lifetime, once a day of use.
    renewedAt?: number
  }
}

const dayMs = 24 * 60 * 60 * 1000
// A session in use is renewed at most once a day: one write a day instead of one per request.
const renewAfterMs = dayMs

/** How long a session lives after it was last renewed: the cookie's own Max-Age (runtimeConfig.session). */
function sessionLifetimeMs(): number {
  const cookie = useRuntimeConfig().session.cookie
  const seconds = Number(cookie ? cookie.maxAge : Number.NaN)
  return Number.isFinite(seconds) && seconds > 0 ? seconds * 1000 : 30 * dayMs
}

const hashed = (sessionId: string) => createHash('sha256').update(sessionId).digest('hex')

/**
 * The signed-in user, read fresh from the database on every request together with the session row
 * the cookie names: a role change applies at once, and a session that was signed out or expired ends
 * even when an old copy of its cookie comes back.
 */
export async function currentUser(event: H3Event): Promise<SessionUser | null> {
  if (event.context.currentUser !== undefined) return event.context.currentUser
  const session = await getUserSession(event)
  const sessionId = session.secure?.sessionId
  let found: SessionUser | null = null
  if (session.user?.id) {
    const db = await useDB()
    const now = new Date()
    const [row] = sessionId
      ? await db.select({ user: users, lastSeenAt: userSessions.lastSeenAt }).from(userSessions)
          .innerJoin(users, eq(users.id, userSessions.userId))
          .where(and(eq(userSessions.idHash, hashed(sessionId)), eq(userSessions.userId, session.user.id), gt(userSessions.expiresAt, now)))
          .limit(1)
      : []
    if (row) {
      found = { id: row.user.id, email: row.user.email, name: row.user.name, role: row.user.role }
      // The older of the row's and the cookie's renewal decides: a renewal made inside a server-side
      // render sets no cookie in the browser, so the browser's next request renews it again.
      const renewed = Math.min(new Date(row.lastSeenAt).getTime(), session.renewedAt ?? 0)
      if (now.getTime() - renewed > renewAfterMs) {
        await db.update(userSessions).set({ lastSeenAt: now, expiresAt: new Date(now.getTime() + sessionLifetimeMs()) })
          .where(eq(userSessions.idHash, hashed(sessionId!)))
        await setUserSession(event, { renewedAt: now.getTime() })
      }
    }
    else {
      await dropCookie(event)
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

/**
 * Starts a new session for this browser: a server-side row and a cookie naming it. A session the
 * browser already held ends first, so an earlier copy of its cookie cannot outlive the new sign-in.
 */
export async function signIn(event: H3Event, user: { id: number }) {
  const db = await useDB()
  await endThisSession(event)
  const sessionId = randomBytes(32).toString('base64url')
  const now = new Date()
  // Expired rows of this user go now: nothing else would ever remove them.
  await db.delete(userSessions).where(and(eq(userSessions.userId, user.id), lte(userSessions.expiresAt, now)))
  await db.insert(userSessions).values({ idHash: hashed(sessionId), userId: user.id, createdAt: now, lastSeenAt: now, expiresAt: new Date(now.getTime() + sessionLifetimeMs()) })
  await replaceUserSession(event, { user: { id: user.id }, secure: { sessionId }, renewedAt: now.getTime() })
  event.context.currentUser = undefined
}

/** Signs this browser out: its session row goes (the user's other browsers stay signed in) and so does its cookie. */
export async function signOut(event: H3Event) {
  await endThisSession(event)
  await dropCookie(event)
  event.context.currentUser = null
}

async function endThisSession(event: H3Event) {
  const sessionId = (await getUserSession(event)).secure?.sessionId
  if (sessionId) await endSession(sessionId)
}

/** Ends one session by the id its cookie carries (also when nuxt-auth-utils clears a cookie itself). */
export async function endSession(sessionId: string) {
  const db = await useDB()
  await db.delete(userSessions).where(eq(userSessions.idHash, hashed(sessionId)))
}

/** Ends every session of a user, on every device (sign out everywhere, a password change or reset). */
export async function endAllSessions(db: Database | Transaction, userId: number) {
  await db.delete(userSessions).where(eq(userSessions.userId, userId))
}

/**
 * What a new password ends, in the transaction that sets it: every session that was signed in with the
 * old one, and every reset link not yet used (a link asked for before the change must not undo it).
 */
export async function endSessionsAndResetLinks(tx: Database | Transaction, userId: number) {
  await endAllSessions(tx, userId)
  await tx.delete(passwordResets).where(and(eq(passwordResets.userId, userId), isNull(passwordResets.usedAt)))
}

/**
 * Removes the cookie. h3 clears a session by writing an empty cookie with the configured options, which
 * here include the 30-day Max-Age; it is written once more with Max-Age 0 so the browser drops it.
 */
async function dropCookie(event: H3Event) {
  await clearUserSession(event)
  const config = useRuntimeConfig().session
  // The runtime config types sameSite as any text; the module's default is 'lax'.
  const options = { path: '/', secure: true, httpOnly: true, ...(config.cookie || {}) } as Parameters<typeof deleteCookie>[2]
  deleteCookie(event, config.name || 'nuxt-session', options)
}

declare module 'h3' {
  interface H3EventContext {
    currentUser?: SessionUser | null
  }
}
