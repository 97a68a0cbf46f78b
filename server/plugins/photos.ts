// At start: finish what a stop interrupted, then run the purge once (the schedule runs it hourly after that).
// Not awaited, as Nitro would not wait for it anyway: requests are answered meanwhile.
export default defineNitroPlugin(() => {
  if (import.meta.prerender) return
  // A photo that failed because the storage could not be written is tried again: 30 s, 1 min, 2 min ... about 2 hours.
  registerJob(PHOTO_RETRY_JOB, retryFailedPhoto, { retryLimit: 8, retryDelay: Number(useRuntimeConfig().photoRetryDelaySeconds) || 30, retryBackoff: true, policy: 'short' })
  setTimeout(() => {
    recoverInterruptedPhotos()
      .then(() => runTask('photos:purge'))
      .catch(error => console.error('[photos] start-up maintenance failed:', error))
  }, 0)
  // With several instances, one killed mid-photo is not restarted to finish it: every instance looks again
  // now and then. The per-upload advisory lock keeps a photo another instance is still working on out of reach.
  const everyMs = Number(useRuntimeConfig().photoRecoveryIntervalSeconds) * 1000
  if (everyMs > 0) {
    const timer = setInterval(() => {
      recoverInterruptedPhotos().catch(error => console.error('[photos] recovery failed:', error))
    }, everyMs)
    timer.unref()
  }
})
