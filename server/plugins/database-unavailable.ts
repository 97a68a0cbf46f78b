import type { H3Error } from 'h3'

// A request that failed because PostgreSQL is away answers 503 with Retry-After instead of a 500, so clients
// (and the load balancer) wait and send again; nothing was written, because the write could not start or commit.
// The 'error' hook runs before Nitro's error handler renders the answer, so the error is rewritten in place.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('error', (error, context) => {
    const event = context.event
    if (!event || event.handled || !isDatabaseUnavailable(error)) return
    const h3Error = error as H3Error
    h3Error.statusCode = 503
    h3Error.statusMessage = 'Database unavailable'
    h3Error.message = `The records cannot be reached just now. Nothing was saved; try again in ${DATABASE_RETRY_AFTER_SECONDS} seconds.`
    // Not a bug of ours: shown to the client as it is, and not logged as an unhandled error.
    h3Error.unhandled = false
    setResponseHeader(event, 'Retry-After', DATABASE_RETRY_AFTER_SECONDS)
  })
})
