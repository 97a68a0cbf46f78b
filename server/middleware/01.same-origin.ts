// Cross-site request protection: the cookie is SameSite=Lax, and every state-changing request
// must come from our own origin (browsers always send Origin on cross-origin POST/PATCH/DELETE).
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  if (SAFE_METHODS.has(event.method)) return
  const origin = getHeader(event, 'origin')
  if (!origin) {
    if (getHeader(event, 'sec-fetch-site') === 'cross-site') throw createError({ statusCode: 403, statusMessage: 'Cross-site request refused' })
    return
  }
  if (!allowedOrigins(event).has(origin)) throw createError({ statusCode: 403, statusMessage: 'Cross-site request refused' })
})
