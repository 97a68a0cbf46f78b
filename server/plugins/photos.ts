import { PHOTO_PROCESSING_CONCURRENCY } from '#shared/utils/photo-limits'
import { perProcessShare } from '../utils/process-share'

// Photo work runs as pg-boss jobs, so any instance may do it and a job of an instance that died is taken up by another:
// the sizes of each new photo, automatic retries after a storage fault, and the hourly purge (one pg-boss schedule for
// all instances). Not awaited, as Nitro would not wait for it anyway: requests are answered meanwhile.
export default defineNitroPlugin(() => {
  if (import.meta.prerender) return
  const config = useRuntimeConfig()
  const deriveWorkers = config.photoDeriveWorkers === 'auto' ? perProcessShare(PHOTO_PROCESSING_CONCURRENCY) : Number(config.photoDeriveWorkers)
  if (deriveWorkers > 0) {
    // A killed instance's job is taken again after expiry; the recovery sweep below usually finishes the photo first.
    registerJob(PHOTO_DERIVE_JOB, derivePendingPhoto, { retryLimit: 5, retryDelay: 5, retryBackoff: true, expireInSeconds: 180, pollingIntervalSeconds: 2, concurrency: deriveWorkers })
  }
  // A photo that failed because the storage could not be written is tried again: 30 s, 1 min, 2 min ... about 2 hours.
  registerJob(PHOTO_RETRY_JOB, retryFailedPhoto, { retryLimit: 8, retryDelay: Number(config.photoRetryDelaySeconds) || 30, retryBackoff: true, policy: 'short' })
  // 'stately': at most one purge waiting and one running, however many instances start or the schedule fires.
  registerJob(PHOTO_PURGE_JOB, runPhotoPurge, { retryLimit: 2, retryDelay: 60, expireInSeconds: 1800, policy: 'stately' })
  whenJobsStart(async (boss) => {
    await boss.schedule(PHOTO_PURGE_JOB, PHOTO_PURGE_CRON, {}, { tz: 'UTC' })
    // Once at start as well (a stop may have left strays); dropped if one is already waiting.
    await boss.send(PHOTO_PURGE_JOB, {})
  })
  setTimeout(() => {
    recoverInterruptedPhotos().catch(error => console.error('[photos] start-up recovery failed:', error))
  }, 0)
  // With several instances, one killed mid-photo is not restarted to finish it: every instance looks again
  // now and then. The per-upload advisory lock keeps a photo another instance is still working on out of reach.
  const everyMs = Number(config.photoRecoveryIntervalSeconds) * 1000
  if (everyMs > 0) {
    const timer = setInterval(() => {
      recoverInterruptedPhotos().catch(error => console.error('[photos] recovery failed:', error))
    }, everyMs)
    timer.unref()
  }
})
