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
})
