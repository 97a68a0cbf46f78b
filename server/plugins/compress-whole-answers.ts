import { brotliCompressSync, constants, gzipSync } from 'node:zlib'
import compressible from 'compressible'
import Negotiator from 'negotiator'
import type { H3Event } from 'h3'

// Almost every answer (a page's HTML, an API's JSON) is one whole text by the time its handler returns. The
// compression middleware (server/middleware/00.compression.ts) would pipe it through a zlib stream: a fresh
// brotli encoder per answer and two trips to the thread pool, 0.15 ms for 3 KB of JSON and 0.5 ms for a page,
// against 0.03 and 0.25 ms compressing the whole text here in one call. The middleware still takes what is
// streamed (and sees the Content-Encoding set here, so leaves these answers alone). Same rules as it: above
// 1 KB, a compressible type, no Cache-Control no-transform, not HEAD, brotli when the browser takes it, else gzip.
const THRESHOLD = 1024
const NO_TRANSFORM = /(?:^|,)\s*no-transform\s*(?:,|$)/i
const ENCODINGS = ['br', 'gzip', 'identity']
const PREFERRED = ['br', 'gzip']

/** A handler's return value h3 would send as JSON: a plain object or array. */
function isPlainJson(body: unknown): body is object {
  if (body === null || typeof body !== 'object') return false
  if (Array.isArray(body)) return true
  const prototype = Object.getPrototypeOf(body)
  return prototype === Object.prototype || prototype === null
}

function encodingFor(event: H3Event) {
  const { req, res } = event.node
  if (req.method === 'HEAD' || res.headersSent || res.getHeader('content-encoding')) return undefined
  if (req.headers['x-nuxt-error']) return undefined // see 00.compression.ts: Nuxt's inner error render stays plain
  const cacheControl = res.getHeader('cache-control')
  if (typeof cacheControl === 'string' && NO_TRANSFORM.test(cacheControl)) return undefined
  // Negotiator 0.6.4 takes the server's preference for equal weights (its types know only the first argument).
  const negotiator = new Negotiator(req) as unknown as { encoding: (available: string[], preferred: string[]) => string | undefined }
  const encoding = negotiator.encoding(ENCODINGS, PREFERRED)
  return encoding === 'br' || encoding === 'gzip' ? encoding : undefined
}

export function compressWholeAnswer(event: H3Event, response: { body?: unknown }) {
  const { body } = response
  if (typeof body !== 'string' && !isPlainJson(body)) return
  const status = event.node.res.statusCode
  if (status === 204 || status === 304) return
  const encoding = encodingFor(event)
  if (!encoding) return
  // Written as h3 writes it (handleHandlerResponse): JSON for objects, a string as it is with text/html by default.
  const text = typeof body === 'string' ? body : JSON.stringify(body)
  const type = event.node.res.getHeader('content-type') ?? (typeof body === 'string' ? 'text/html' : 'application/json')
  if (typeof type !== 'string' || !compressible(type)) return
  const bytes = Buffer.from(text, 'utf8')
  if (bytes.length < THRESHOLD) return
  const compressed = encoding === 'br'
    ? brotliCompressSync(bytes, { params: { [constants.BROTLI_PARAM_QUALITY]: 4, [constants.BROTLI_PARAM_SIZE_HINT]: bytes.length } })
    : gzipSync(bytes, { level: 6 })
  setResponseHeader(event, 'content-type', type)
  setResponseHeader(event, 'content-encoding', encoding)
  appendResponseHeader(event, 'vary', 'Accept-Encoding')
  response.body = compressed
}

export default defineNitroPlugin((nitroApp) => {
  // Registered after the modules' own hooks, so it sees the answer as they leave it.
  nitroApp.hooks.hook('beforeResponse', compressWholeAnswer)
})
