// The session cookie is Secure unless told otherwise; an http origin (npm start on 127.0.0.1) without an
// explicit NUXT_SESSION_COOKIE_SECURE gets a plain cookie, since browsers drop Secure cookies on plain http
// addresses other than localhost.
export default defineNitroPlugin(() => {
  const config = useRuntimeConfig()
  const origin = String(config.appOrigin || '')
  if (process.env.NUXT_SESSION_COOKIE_SECURE === undefined && origin.startsWith('http://')) {
    config.session.cookie = { ...config.session.cookie, secure: false }
  }
})
