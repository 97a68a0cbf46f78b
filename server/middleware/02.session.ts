import { eq } from 'drizzle-orm'
import type { H3Event, H3EventContext } from 'h3'

// Reads the session row behind the cookie on every request: revoked, idle or too old sessions end here.
const TOUCH_AFTER_MS = 60_000

/**
 * A page's server render asks our own API for its data through inner requests (Nitro's local fetch) that
 * carry the page request's cookie and hand over its context. The page request already read that cookie's
 * session row a moment ago: an inner request with the very same cookie takes that answer instead of
 * unsealing the cookie and reading the row again (7-8 inner requests per page: scripts/bench/profile.ts).
 */
function checkedByPageRequest(event: H3Event) {
  const outer = (event.node.req as { __unenv__?: H3EventContext }).__unenv__
  const cookie = getHeader(event, 'cookie')
  return outer?.auth && cookie && outer.authCookie === cookie ? outer : null
}

/**
 * Unsealing the cookie (iron: two PBKDF2 keys, an HMAC and AES through WebCrypto, each a trip to libuv's thread
 * pool) cost about as much as the session row's query (`pbkdf2` in the CPU profile of every request). The same
 * sealed text always unseals to the same session, so that answer is kept for a minute, never beyond the seal's
 * own age limit; the row behind it (revoked, idle, too old) is still read on every request below.
 */
const UNSEALED_KEEP_MS = 60_000
const UNSEALED_MAX = 5_000
interface UnsealedSession { id: string, createdAt: number, data: Record<string, unknown> }
const unsealed = new Map<string, { session: UnsealedSession, until: number }>()

function sessionSettings() {
  const { name = 'h3', maxAge } = useRuntimeConfig().session as { name?: string, maxAge?: number }
  return { name, maxAgeMs: maxAge ? maxAge * 1000 : Number.POSITIVE_INFINITY }
}

/** Hands h3 the session a sealed cookie gave a moment ago: getUserSession then finds it and unseals nothing. */
function reuseUnsealed(event: H3Event, sealed: string | undefined, name: string) {
  const kept = sealed ? unsealed.get(sealed) : undefined
  if (!kept) return
  if (kept.until < Date.now()) {
    unsealed.delete(sealed!)
    return
  }
  event.context.sessions ??= Object.create(null)
  event.context.sessions![name] = structuredClone(kept.session)
}

function keepUnsealed(event: H3Event, sealed: string | undefined, name: string, maxAgeMs: number) {
  const session = event.context.sessions?.[name] as UnsealedSession | undefined
  if (!sealed || !session?.createdAt || unsealed.has(sealed)) return
  if (unsealed.size >= UNSEALED_MAX) unsealed.delete(unsealed.keys().next().value!)
  unsealed.set(sealed, { session: structuredClone({ id: session.id, createdAt: session.createdAt, data: session.data }), until: Math.min(Date.now() + UNSEALED_KEEP_MS, session.createdAt + maxAgeMs) })
}

export default defineEventHandler(async (event) => {
  if (event.path.startsWith('/_nuxt/') || event.path.startsWith('/__nuxt') || event.path === '/api/health') return
  // The page shell the service worker keeps for anyone: no session is read, so no cookie is set on it.
  if (event.path === '/offline-shell') return
  const outer = checkedByPageRequest(event)
  if (outer) {
    event.context.auth = outer.auth
    event.context.authCookie = outer.authCookie
    return
  }
  const settings = sessionSettings()
  // h3 reads a session header before the cookie: with one, h3 alone decides.
  const sealed = getRequestHeader(event, `x-${settings.name.toLowerCase()}-session`) ? undefined : getCookie(event, settings.name)
  reuseUnsealed(event, sealed, settings.name)
  const session = await getUserSession(event)
  if (!session.sessionId) return
  keepUnsealed(event, sealed, settings.name, settings.maxAgeMs)
  const config = useRuntimeConfig(event)
  const [row] = await useDb().select({
    id: schema.sessions.id, createdAt: schema.sessions.createdAt, lastSeenAt: schema.sessions.lastSeenAt, revokedAt: schema.sessions.revokedAt,
    user: { id: schema.users.id, name: schema.users.name, email: schema.users.email, units: schema.users.units, decimalMark: schema.users.decimalMark },
  }).from(schema.sessions).innerJoin(schema.users, eq(schema.users.id, schema.sessions.userId))
    .where(eq(schema.sessions.id, session.sessionId)).limit(1)
  const now = Date.now()
  const valid = row && !row.revokedAt
    && now - row.lastSeenAt.getTime() < Number(config.sessionIdleSeconds) * 1000
    && now - row.createdAt.getTime() < Number(config.sessionAbsoluteSeconds) * 1000
  if (!valid) {
    if (sealed) unsealed.delete(sealed)
    await clearUserSession(event)
    return
  }
  event.context.auth = { sessionId: row.id, user: row.user }
  event.context.authCookie = getHeader(event, 'cookie')
  if (now - row.lastSeenAt.getTime() > TOUCH_AFTER_MS) {
    await useDb().update(schema.sessions).set({ lastSeenAt: new Date(now) }).where(eq(schema.sessions.id, row.id))
  }
})
