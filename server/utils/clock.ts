import { createHash, timingSafeEqual } from 'node:crypto'
import type { H3Event } from 'h3'

const HEADER_SECRET = 'x-fintrail-test-clock'
const HEADER_NOW = 'x-fintrail-test-now'

let warned = false

/**
 * Whether this request may use the test clock: only when the server was started with NUXT_TEST_CLOCK
 * (the test setup sets a random secret; `npm start` and a production deployment leave it empty) and the
 * request carries that same secret. Without both, the header is ignored and the real clock is used.
 */
export function testClockAllowed(event: H3Event): boolean {
  const secret = String(useRuntimeConfig(event).testClock || '')
  if (!secret) return false
  if (!warned) {
    console.warn('[clock] NUXT_TEST_CLOCK is set: requests with its secret can set the due-list clock and run the digest. Never set it in production.')
    warned = true
  }
  const given = getHeader(event, HEADER_SECRET) ?? ''
  const digest = (text: string) => createHash('sha256').update(text).digest()
  return given !== '' && timingSafeEqual(digest(given), digest(secret))
}

/** The moment the due lists are worked out for: the real clock, or a test's fixed one (see above). */
export function serverNow(event?: H3Event): Date {
  if (event && testClockAllowed(event)) {
    const fixed = new Date(getHeader(event, HEADER_NOW) ?? '')
    if (!Number.isNaN(fixed.getTime())) return fixed
  }
  return new Date()
}
