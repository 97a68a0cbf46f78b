import { AsyncLocalStorage } from 'node:async_hooks'
import { randomUUID } from 'node:crypto'
import type { H3Event } from 'h3'

// Every request gets an id: taken from X-Request-Id when a proxy in front already set a sane one, else new.
// It goes back in the response header, onto every log line written while the request is handled (through
// an AsyncLocalStorage around Nitro's handler), and onto one summary line when the response is sent.
const requestContext = new AsyncLocalStorage<string>()
const INCOMING_ID = /^[\w.:-]{8,128}$/

function requestIdFor(event: H3Event) {
  event.context.requestId ??= (() => {
    const incoming = getRequestHeader(event, 'x-request-id')
    return incoming && INCOMING_ID.test(incoming) ? incoming : randomUUID()
  })()
  return event.context.requestId as string
}

export default defineNitroPlugin((nitroApp) => {
  routeConsoleToLogger()
  setRequestIdSource(() => requestContext.getStore())

  const handler = nitroApp.h3App.handler
  nitroApp.h3App.handler = event => requestContext.run(requestIdFor(event), () => handler(event))

  nitroApp.hooks.hook('request', (event) => {
    const startedAt = performance.now()
    const requestId = requestIdFor(event)
    setResponseHeader(event, 'X-Request-Id', requestId)
    // On the socket's end rather than Nitro's afterResponse hook, which error answers never reach.
    event.node.res.once('close', () => logRequest(event, requestId, startedAt))
  })

  nitroApp.hooks.hook('error', (error, { event }) => {
    if (!event) return
    // The error handler runs outside the handler's context: the rest of this request's work gets the id again.
    requestContext.enterWith(requestIdFor(event))
    event.context.requestError = error
  })
})

function logRequest(event: H3Event, requestId: string, startedAt: number) {
  const response = event.node.res
  const status = response.statusCode
  const line = {
    requestId,
    method: event.method,
    path: loggablePath(event.path),
    status,
    ms: Math.round(performance.now() - startedAt),
    // The client went away before the answer was complete.
    ...(response.writableFinished ? {} : { aborted: true }),
    ...(event.context.requestError && status >= 500 ? { err: event.context.requestError } : {}),
  }
  if (status === 503) logger.warn(line, 'request refused: a part is unavailable')
  else if (status >= 500) logger.error(line, 'request failed')
  else logger.info(line, 'request')
}
