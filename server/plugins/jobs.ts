// Starts the job runner once every plugin has registered its workers, and stops it on shutdown
// so running jobs finish (or are handed back) before the pool closes.
export default defineNitroPlugin((nitroApp) => {
  if (import.meta.prerender) return
  let closing = false
  setTimeout(() => void startJobsUntilRunning(() => !closing), 0)
  nitroApp.hooks.hook('close', () => {
    closing = true
    return stopJobs()
  })
})
