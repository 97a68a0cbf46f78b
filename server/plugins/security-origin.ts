// The security headers come from nuxt-security (nuxt.config.ts). One directive depends on where the app is
// served: `upgrade-insecure-requests` makes the browser fetch every asset over https, which is right behind
// an https origin and breaks every page on a plain-http address (a LAN box, `npm start`). It is switched on
// here, at start, only when every configured public origin is https.
export default defineNitroPlugin((nitroApp) => {
  const origins = String(useRuntimeConfig().appOrigin || '').split(',').map(s => s.trim()).filter(Boolean)
  const https = origins.length > 0 && origins.every(origin => origin.startsWith('https://'))
  if (!https) return
  nitroApp.hooks.hook('nuxt-security:routeRules', (rules) => {
    const csp = rules['/**']?.headers && rules['/**'].headers.contentSecurityPolicy
    if (csp && typeof csp === 'object') csp['upgrade-insecure-requests'] = true
  })
})
