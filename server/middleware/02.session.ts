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
  const session = await getUserSession(event)
  if (!session.sessionId) return
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
    await clearUserSession(event)
    return
  }
  event.context.auth = { sessionId: row.id, user: row.user }
  event.context.authCookie = getHeader(event, 'cookie')
  if (now - row.lastSeenAt.getTime() > TOUCH_AFTER_MS) {
    await useDb().update(schema.sessions).set({ lastSeenAt: new Date(now) }).where(eq(schema.sessions.id, row.id))
  }
})
