import { constants } from 'node:zlib'
import compression from 'compression'
import type { NodeMiddleware } from 'h3'

// JSON answers of the API above 1 KB go out compressed (brotli when the browser takes it, else gzip).
// Built assets under /_nuxt are served precompressed by Nitro and never reach this (they already carry a
// Content-Encoding, which the middleware leaves alone). Archives and photos are not compressible types,
// so their streams pass through untouched; HEAD and bodiless answers (the tus protocol's) are skipped.
// Brotli at quality 4 compresses about as well as gzip -6 at a fraction of the time of its default 11.
// Its types speak Express; at run time it is a plain Node (req, res, next) middleware.
const compress = compression({
  threshold: 1024,
  brotli: { params: { [constants.BROTLI_PARAM_QUALITY]: 4 } },
}) as unknown as NodeMiddleware

// Pages are left alone for now: on Nitro's HTML error page (a 404 for a fish that does not exist) the
// compressed answer reached the browser with an empty body, which Chromium refuses to show.
const compressApi = fromNodeMiddleware(compress)

export default defineEventHandler((event) => {
  if (event.path.startsWith('/api/')) return compressApi(event)
})
