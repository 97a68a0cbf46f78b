import { eq } from 'drizzle-orm'

export const PHOTO_RETRY_JOB = 'photo-retry'

/** After a storage fault, the photo is tried again by the job runner (with backoff) until the folder can be written. */
export async function scheduleAutomaticRetry(photoId: string) {
  const delay = Number(useRuntimeConfig().photoRetryDelaySeconds) || 30
  await sendJob(PHOTO_RETRY_JOB, { photoId }, { singletonKey: photoId, startAfterSeconds: delay })
    .catch(error => console.error(`[photos] could not schedule a retry of ${photoId}:`, error instanceof Error ? error.message : error))
}

/** The job: a failed photo is processed again; still failing throws, so pg-boss tries later. */
export async function retryFailedPhoto(data: { photoId: string }) {
  const [photo] = await useDb().select().from(schema.photos).where(eq(schema.photos.id, data.photoId))
  if (!photo || photo.removedAt || (photo.state !== 'failed' && photo.state !== 'pending')) return
  // Pending: an earlier run of this job was cut off (its instance stopped after marking the photo), and the
  // statement it had sent may even have completed after it was gone. Finished here, or later if still held.
  const outcome = photo.state === 'pending' ? await resumePendingPhoto(photo.uploadId) : await retryPhoto(photo, { retryOnStorageFault: false })
  if (!outcome) return
  if (outcome === BUSY) throw new Error('photo is being processed elsewhere; trying later')
  if (outcome.state === 'failed') throw new Error(outcome.failureReason ?? 'still failing')
}
