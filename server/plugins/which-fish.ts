// Features of photos taken from above, computed in the background once each becomes ready
// (server/utils/which-fish.ts); the comparison itself runs in a worker thread.
export default defineNitroPlugin(() => {
  if (import.meta.prerender) return
  registerJob<{ photoId: string }>(PHOTO_FEATURES_JOB, async ({ photoId }) => {
    await computePhotoFeatures(photoId)
  }, { retryLimit: 3, retryDelay: 10, expireInSeconds: 120, pollingIntervalSeconds: 2, concurrency: 1 })
  // A little after start, so the server answers its first requests before the worker takes a core.
  setTimeout(() => {
    warmWhichFish().catch(error => console.error('[which-fish] could not start the worker:', error))
  }, 2000).unref()
})
