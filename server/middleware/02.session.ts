import type { H3Event, H3EventContext } from 'h3'
import { accessStatements } from '../db/queries/access'

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

function sessionSettings() {
  const { name = 'h3', maxAge } = useRuntimeConfig().session as { name?: string, maxAge?: number }
  return { name, maxAgeMs: maxAge ? maxAge * 1000 : Number.POSITIVE_INFINITY }
}

// Ids only (UUIDs), so a fixed route added beside them later (/api/fish/search) is never taken for one.
const ID = '[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}'

/**
 * The hot reads (a fish, its growth and timeline; a pond and its fish list): GET routes whose first database
 * work is requireFishRole or requirePondRole. Their access statement reads the session row too
 * (server/db/queries/access.ts), so such a request costs one round trip to PostgreSQL before its own query
 * instead of two. A route added here must call one of the two before anything that needs the user.
 */
const READS_CHECKING_THE_SESSION_THEMSELVES = new RegExp(`^/api/(?:fish/${ID}(?:/growth|/timeline)?|ponds/${ID}(?:/fish)?)(?:\\?|$)`)

// Reads the session row behind the cookie on every request (here, or in the hot reads' access statement):
// revoked, idle or too old sessions end there.
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
  reuseUnsealedSession(event, sealed, settings.name)
  const session = await getUserSession(event)
  if (!session.sessionId) return
  keepUnsealedSession(event, sealed, settings.name, settings.maxAgeMs)
  if (event.method === 'GET' && READS_CHECKING_THE_SESSION_THEMSELVES.test(event.path)) {
    event.context.sessionToCheck = { id: session.sessionId, sealed }
    return
  }
  const [row] = await accessStatements(useDb()).session.execute({ sessionId: session.sessionId })
  await acceptSessionRow(event, row, sealed)
})
