import type { H3Event } from 'h3'
import { and, count, eq, gt, inArray, lt, min } from 'drizzle-orm'

// Failed sign-ins are counted per account and per client address over a sliding window.
export function clientAddress(event: H3Event) {
  return getRequestIP(event, { xForwardedFor: Boolean(useRuntimeConfig(event).trustProxy) }) ?? 'unknown'
}

function keysFor(event: H3Event, email: string) {
  return { account: `email:${email}`, address: `ip:${clientAddress(event)}` }
}

export async function assertSignInAllowed(event: H3Event, email: string) {
  const config = useRuntimeConfig(event)
  const windowMs = Number(config.signInWindowSeconds) * 1000
  const since = new Date(Date.now() - windowMs)
  const keys = keysFor(event, email)
  const limits: [string, number][] = [[keys.account, Number(config.signInLimit)], [keys.address, Number(config.signInIpLimit)]]
  for (const [key, limit] of limits) {
    const [row] = await useDb().select({ n: count(), oldest: min(schema.signInFailures.at) })
      .from(schema.signInFailures)
      .where(and(eq(schema.signInFailures.key, key), gt(schema.signInFailures.at, since)))
    if (row && row.n >= limit && row.oldest) {
      const retryAfter = Math.max(1, Math.ceil((new Date(row.oldest).getTime() + windowMs - Date.now()) / 1000))
      setResponseHeader(event, 'Retry-After', retryAfter)
      throw createError({ statusCode: 429, statusMessage: 'Too many failed sign-ins', message: `Too many failed sign-ins. Try again in ${Math.ceil(retryAfter / 60)} minutes, or reset your password.` })
    }
  }
}

export async function recordSignInFailure(event: H3Event, email: string) {
  const keys = keysFor(event, email)
  const windowMs = Number(useRuntimeConfig(event).signInWindowSeconds) * 1000
  await useDb().insert(schema.signInFailures).values([{ key: keys.account }, { key: keys.address }])
  await useDb().delete(schema.signInFailures).where(lt(schema.signInFailures.at, new Date(Date.now() - 2 * windowMs)))
}

export async function clearSignInFailures(email: string) {
  await useDb().delete(schema.signInFailures).where(inArray(schema.signInFailures.key, [`email:${email}`]))
}
