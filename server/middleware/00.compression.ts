import { constants } from 'node:zlib'
import compression from 'compression'
import type { NodeMiddleware } from 'h3'

// Pages and API answers above 1 KB go out compressed (brotli when the browser takes it, else gzip).
// Built assets under /_nuxt are served precompressed by Nitro and never reach this (they already carry a
// Content-Encoding, which the middleware leaves alone). Archives and photos are not compressible types,
// so their streams pass through untouched; HEAD and bodiless answers (the tus protocol's) are skipped.
// Brotli at quality 4 compresses about as well as gzip -6 at a fraction of the time of its default 11.
// Its types speak Express; at run time it is a plain Node (req, res, next) middleware.
const compress = fromNodeMiddleware(compression({
  threshold: 1024,
  brotli: { params: { [constants.BROTLI_PARAM_QUALITY]: 4 } },
}) as unknown as NodeMiddleware)

export default defineEventHandler((event) => {
  // Nuxt renders an error page (a 404 for a fish that does not exist) with an internal request to
  // /__nuxt_error that carries every header of the browser's request, Accept-Encoding included, marked
  // `x-nuxt-error`. Compressing that inner answer made Nuxt copy its Content-Encoding onto the real
  // response and send the compressed bytes read as text, so the page arrived broken or empty. The inner
  // answer stays plain; the browser's own response, wrapped here when it began, compresses the page once.
  if (getRequestHeader(event, 'x-nuxt-error')) return
  return compress(event)
})
