// Errors that mean "PostgreSQL cannot be reached just now" (stopped, restarting, network gone), as opposed
// to a bug or a bad query: such a request is answered 503 with a retry hint, and the pool reconnects by itself.
const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', 'EAI_AGAIN',
  // SQLSTATE class 08 (connection exception) and 57P01-57P03 (admin shutdown, crash shutdown, cannot connect now).
  '08000', '08001', '08003', '08004', '08006', '57P01', '57P02', '57P03',
])
const UNAVAILABLE_MESSAGES = /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error|connect ECONNREFUSED|the database system is (starting up|shutting down|in recovery mode)|terminating connection due to administrator command/i

/** Seconds a client should wait before trying again while the database is away. */
export const DATABASE_RETRY_AFTER_SECONDS = 5

export function isDatabaseUnavailable(error: unknown): boolean {
  let current: unknown = error
  // Drizzle, h3 and pg-boss each wrap the driver's error once; a few levels are enough.
  for (let depth = 0; depth < 6 && current; depth++) {
    const { code, message, cause } = current as { code?: unknown, message?: unknown, cause?: unknown }
    if (typeof code === 'string' && UNAVAILABLE_CODES.has(code)) return true
    if (typeof message === 'string' && UNAVAILABLE_MESSAGES.test(message)) return true
    current = cause
  }
  return false
}
