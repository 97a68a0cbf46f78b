// Starts the job runner once every plugin has registered its workers, and stops it on shutdown
// so running jobs finish (or are handed back) before the pool closes.
export default defineNitroPlugin((nitroApp) => {
  if (import.meta.prerender) return
  setTimeout(() => {
    getBoss().catch(error => console.error('[jobs] could not start:', error instanceof Error ? error.message : error))
  }, 0)
  nitroApp.hooks.hook('close', () => stopJobs())
})
