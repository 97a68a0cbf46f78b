// Nitro's useRuntimeConfig(event) copies the whole runtime config and walks it against process.env once
// per request (for platforms whose environment differs per request). This server's environment is read
// once at start, so every request, the inner ones of a page's server render included, shares the config
// Nitro already resolved at start (frozen: nothing may change it per request). Profiling the built server
// (scripts/bench/profile.ts) showed that copy as 5-10 % of every request's CPU time.
export default defineNitroPlugin((nitroApp) => {
  const shared = useRuntimeConfig()
  nitroApp.hooks.hook('request', (event) => {
    event.context.nitro ??= { errors: [] }
    event.context.nitro.runtimeConfig ??= shared
  })
})
