import type { H3Event } from 'h3'
import { and, eq, isNull, ne } from 'drizzle-orm'
import type { CurrentUser } from '#shared/types'

declare module 'h3' {
  interface H3EventContext {
    auth?: { sessionId: string, user: CurrentUser }
    /** The Cookie header `auth` was read from (server/middleware/02.session.ts). */
    authCookie?: string
    /**
     * The session a valid cookie names, its row not read yet: on the hot reads (server/middleware/02.session.ts)
     * the route's access statement reads it with the membership and the row asked for (server/utils/access.ts).
     */
    sessionToCheck?: { id: string, sealed?: string }
  }
}

declare module '#auth-utils' {
  interface User { id: string, name: string }
  interface UserSession { sessionId?: string }
}

/**
 * Unsealing the cookie (iron: two PBKDF2 keys, an HMAC and AES through WebCrypto, each a trip to libuv's thread
 * pool) cost about as much as the session row's query (`pbkdf2` in the CPU profile of every request). The same
 * sealed text always unseals to the same session, so that answer is kept for a minute, never beyond the seal's
 * own age limit; the row behind it (revoked, idle, too old) is still read on every request.
 */
const UNSEALED_KEEP_MS = 60_000
const UNSEALED_MAX = 5_000
interface UnsealedSession { id: string, createdAt: number, data: Record<string, unknown> }
const unsealed = new Map<string, { session: UnsealedSession, until: number }>()

/** Hands h3 the session a sealed cookie gave a moment ago: getUserSession then finds it and unseals nothing. */
export function reuseUnsealedSession(event: H3Event, sealed: string | undefined, name: string) {
  const kept = sealed ? unsealed.get(sealed) : undefined
  if (!kept) return
  if (kept.until < Date.now()) {
    unsealed.delete(sealed!)
    return
  }
  event.context.sessions ??= Object.create(null)
  event.context.sessions![name] = structuredClone(kept.session)
}

export function keepUnsealedSession(event: H3Event, sealed: string | undefined, name: string, maxAgeMs: number) {
  const session = event.context.sessions?.[name] as UnsealedSession | undefined
  if (!sealed || !session?.createdAt || unsealed.has(sealed)) return
  if (unsealed.size >= UNSEALED_MAX) unsealed.delete(unsealed.keys().next().value!)
  unsealed.set(sealed, { session: structuredClone({ id: session.id, createdAt: session.createdAt, data: session.data }), until: Math.min(Date.now() + UNSEALED_KEEP_MS, session.createdAt + maxAgeMs) })
}

// The row's last-seen time is written at most once a minute per session.
const TOUCH_AFTER_MS = 60_000

/** A session row as server/db/queries/access.ts reads it, with its user. */
export interface SessionCheckRow {
  session: { id: string, createdAt: Date, lastSeenAt: Date, revokedAt: Date | null }
  user: CurrentUser
}

/**
 * Takes the session row read for this request: a valid one signs the request in (`event.context.auth`); a
 * revoked, idle or too old one, or none, ends here and its cookie is cleared, so the route answers 401.
 */
export async function acceptSessionRow(event: H3Event, row: SessionCheckRow | undefined, sealed: string | undefined) {
  const config = useRuntimeConfig(event)
  const now = Date.now()
  const valid = row && !row.session.revokedAt
    && now - row.session.lastSeenAt.getTime() < Number(config.sessionIdleSeconds) * 1000
    && now - row.session.createdAt.getTime() < Number(config.sessionAbsoluteSeconds) * 1000
  if (!valid) {
    if (sealed) unsealed.delete(sealed)
    await clearUserSession(event)
    return false
  }
  event.context.auth = { sessionId: row.session.id, user: row.user }
  event.context.authCookie = getHeader(event, 'cookie')
  if (now - row.session.lastSeenAt.getTime() > TOUCH_AFTER_MS) {
    await useDb().update(schema.sessions).set({ lastSeenAt: new Date(now) }).where(eq(schema.sessions.id, row.session.id))
  }
  return true
}

export async function startSession(event: H3Event, user: { id: string, name: string }) {
  const [row] = await useDb().insert(schema.sessions)
    .values({ userId: user.id, userAgent: getHeader(event, 'user-agent')?.slice(0, 300) ?? null })
    .returning({ id: schema.sessions.id })
  await replaceUserSession(event, { user: { id: user.id, name: user.name }, sessionId: row!.id, loggedInAt: Date.now() })
  return row!.id
}

export async function revokeSession(sessionId: string) {
  await useDb().update(schema.sessions).set({ revokedAt: new Date() })
    .where(and(eq(schema.sessions.id, sessionId), isNull(schema.sessions.revokedAt)))
}

/** Ends every session of the user (a copied cookie included), optionally keeping one. */
export async function revokeAllSessions(userId: string, exceptSessionId?: string) {
  const conditions = [eq(schema.sessions.userId, userId), isNull(schema.sessions.revokedAt)]
  if (exceptSessionId) conditions.push(ne(schema.sessions.id, exceptSessionId))
  await useDb().update(schema.sessions).set({ revokedAt: new Date() }).where(and(...conditions))
}

export function requireUser(event: H3Event): CurrentUser {
  const user = event.context.auth?.user
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Sign in first' })
  return user
}

export function publicUser(user: CurrentUser): CurrentUser {
  return { id: user.id, name: user.name, email: user.email, units: user.units, decimalMark: user.decimalMark }
}
