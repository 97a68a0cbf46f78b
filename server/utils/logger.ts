import { format } from 'node:util'
import pino from 'pino'

// What must never reach a log line, wherever it sits in a logged object: session cookies, link tokens,
// passwords, and the words of an e-mail (its subject may name a person; its body carries links with tokens).
const SECRET_KEYS = ['cookie', 'set-cookie', 'authorization', 'password', 'currentPassword', 'newPassword', 'token', 'sessionPassword', 'text', 'html', 'body', 'subject']
const REDACT_PATHS = SECRET_KEYS.flatMap(key => [`["${key}"]`, `*["${key}"]`, `*.*["${key}"]`])

/** Path segments that are link tokens (invitations, handovers, transfers, the reset page's query is dropped anyway). */
const TOKEN_IN_PATH = /\/(invitations|handovers|transfers)\/[^/?#]+/g

/** The request path as it may be logged: no query string, no link tokens. */
export function loggablePath(path: string) {
  return (path.split('?')[0] ?? '').replace(TOKEN_IN_PATH, '/$1/:token')
}

// Drizzle puts a failed query's parameters into its message (an e-mail, a token's hash): never logged.
const QUERY_PARAMS = /\nparams: [^\n]*/g
function scrub(text: string) {
  return text.replace(QUERY_PARAMS, '\nparams: [redacted]')
}

/** An error as logged: type, message, code and stack of it and its causes, with query parameters taken out. */
function safeError(error: unknown, depth = 0): unknown {
  if (!(error instanceof Error) || depth > 4) return error instanceof Error ? { type: error.name } : undefined
  const { code, statusCode } = error as { code?: unknown, statusCode?: unknown }
  return {
    type: error.name,
    message: scrub(error.message),
    ...(code !== undefined ? { code } : {}),
    ...(statusCode !== undefined ? { statusCode } : {}),
    stack: error.stack ? scrub(error.stack) : undefined,
    cause: safeError(error.cause, depth + 1),
  }
}

let requestIdOf: () => string | undefined = () => undefined

/** Set once by the request-log plugin: how a line finds the request it was written for. */
export function setRequestIdSource(source: () => string | undefined) {
  requestIdOf = source
}

/**
 * One JSON object per line on stdout (pino). Lines written while a request is handled carry its
 * `requestId`, the same id the response sends back in `X-Request-Id`.
 */
export const logger = pino({
  level: process.env.NUXT_LOG_LEVEL || 'info',
  base: { pid: process.pid },
  timestamp: pino.stdTimeFunctions.isoTime,
  redact: { paths: REDACT_PATHS, censor: '[redacted]' },
  serializers: { err: error => safeError(error) },
  mixin() {
    const requestId = requestIdOf()
    return requestId ? { requestId } : {}
  },
})

/** console.* from our code and from libraries becomes JSON lines too, with the request id when there is one. */
export function routeConsoleToLogger() {
  const levels = { log: 'info', info: 'info', warn: 'warn', error: 'error', debug: 'debug' } as const
  for (const [method, level] of Object.entries(levels)) {
    (console as unknown as Record<string, (...args: unknown[]) => void>)[method] = (...args: unknown[]) => {
      const error = args.find(arg => arg instanceof Error)
      const message = scrub(format(...args))
      if (error) logger[level]({ err: error }, message)
      else logger[level](message)
    }
  }
}
