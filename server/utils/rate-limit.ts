import type { H3Event } from 'h3'
import { and, count, eq, gt, inArray, like, lt, min, or } from 'drizzle-orm'

// Failed sign-ins over a sliding window, counted three ways:
// - per account and client address together: the hard limit (429). Someone guessing from their
//   own address is stopped without touching the owner, who signs in from another.
// - per account from anywhere: above a higher ceiling each attempt waits a little longer (capped),
//   which slows a guesser spread over many addresses but never locks the owner out.
// - per client address over all accounts: a hard limit against one address spraying many accounts.
export function clientAddress(event: H3Event) {
  return getRequestIP(event, { xForwardedFor: Boolean(useRuntimeConfig(event).trustProxy) }) ?? 'unknown'
}

function keysFor(event: H3Event, email: string) {
  // An address from X-Forwarded-For is whatever the client wrote: kept to the column's size.
  const address = clientAddress(event).slice(0, 45)
  return { pair: `pair:${email}|${address}`.slice(0, 300), account: `email:${email}`.slice(0, 300), address: `ip:${address}` }
}

async function failuresSince(key: string, since: Date) {
  const [row] = await useDb().select({ n: count(), oldest: min(schema.signInFailures.at) })
    .from(schema.signInFailures)
    .where(and(eq(schema.signInFailures.key, key), gt(schema.signInFailures.at, since)))
  return { n: row?.n ?? 0, oldest: row?.oldest ? new Date(row.oldest) : null }
}

/** The wait before answering once an account is over its ceiling: 250 ms more per failure above it, at most the cap. */
export function accountDelayMs(failures: number, ceiling: number, capMs: number) {
  return failures < ceiling ? 0 : Math.min(capMs, 250 * (failures - ceiling + 1))
}

export async function assertSignInAllowed(event: H3Event, email: string) {
  const config = useRuntimeConfig(event)
  const windowMs = Number(config.signInWindowSeconds) * 1000
  const since = new Date(Date.now() - windowMs)
  const keys = keysFor(event, email)
  const hardLimits: [string, number][] = [[keys.pair, Number(config.signInLimit)], [keys.address, Number(config.signInIpLimit)]]
  for (const [key, limit] of hardLimits) {
    const { n, oldest } = await failuresSince(key, since)
    if (n >= limit && oldest) {
      const retryAfter = Math.max(1, Math.ceil((oldest.getTime() + windowMs - Date.now()) / 1000))
      setResponseHeader(event, 'Retry-After', retryAfter)
      throw createError({ statusCode: 429, statusMessage: 'Too many failed sign-ins', message: `Too many failed sign-ins from here. Try again in ${Math.ceil(retryAfter / 60)} minutes, or reset your password.` })
    }
  }
  const { n } = await failuresSince(keys.account, since)
  const delay = accountDelayMs(n, Number(config.signInAccountCeiling), Number(config.signInDelayCapMs))
  if (delay) await new Promise(resolve => setTimeout(resolve, delay))
}

export async function recordSignInFailure(event: H3Event, email: string) {
  const keys = keysFor(event, email)
  const windowMs = Number(useRuntimeConfig(event).signInWindowSeconds) * 1000
  await useDb().insert(schema.signInFailures).values([{ key: keys.pair }, { key: keys.account }, { key: keys.address }])
  await useDb().delete(schema.signInFailures).where(lt(schema.signInFailures.at, new Date(Date.now() - 2 * windowMs)))
}

/** After a successful sign-in: the failures from this address for this account. */
export async function clearSignInFailuresFrom(event: H3Event, email: string) {
  await useDb().delete(schema.signInFailures).where(inArray(schema.signInFailures.key, [keysFor(event, email).pair]))
}

/** After a password reset: every failure counted against the account, from every address. */
export async function clearSignInFailures(email: string) {
  const pairPrefix = `pair:${email.replaceAll('\\', '\\\\').replaceAll('%', '\\%').replaceAll('_', '\\_')}|%`
  await useDb().delete(schema.signInFailures).where(or(eq(schema.signInFailures.key, `email:${email}`), like(schema.signInFailures.key, pairPrefix)))
}
