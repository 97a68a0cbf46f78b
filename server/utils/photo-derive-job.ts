import { eq } from 'drizzle-orm'
import { PhotoRejection } from './photo-files'
import { BUSY, resumePendingPhoto } from './photo-pipeline'

/**
 * The sizes of a new photo are made by this job, sent in the same transaction as the photo's pending row (an upload's
 * finish, an archive import): whichever instance fetches it first does the work, and the job of an instance that
 * died mid-way is taken up again by another (after its expiry, or sooner by the recovery sweep).
 */
export const PHOTO_DERIVE_JOB = 'photo-derive'

/** A photo the job refused (a file that cannot be decoded): its row and files are gone, the reason is the job's output. */
export interface DeriveRefusal { refused: { status: number, message: string } }

export function queuePhotoDerivation(photoId: string, tx?: Tx) {
  return sendJob(PHOTO_DERIVE_JOB, { photoId }, tx ? { tx } : {})
}

export async function derivePendingPhoto(data: { photoId: string }): Promise<DeriveRefusal | { state: string }> {
  const [photo] = await useDb().select().from(schema.photos).where(eq(schema.photos.id, data.photoId)).limit(1)
  // Already made (by the recovery sweep, or a retry pressed meanwhile), or removed for good.
  if (!photo || photo.state !== 'pending') return { state: photo?.state ?? 'gone' }
  try {
    const outcome = await resumePendingPhoto(photo.uploadId)
    // Someone holds the upload's lock and will finish it; taken again later in case they stop first.
    if (outcome === BUSY) throw new Error('photo is being processed elsewhere; trying later')
    return { state: outcome?.state ?? 'gone' }
  }
  catch (error) {
    if (error instanceof PhotoRejection) return { refused: { status: error.status, message: error.message } }
    throw error
  }
}

/** The refusal a finished derive job recorded, if it refused the photo. */
export async function derivationRefusal(jobId: string): Promise<PhotoRejection | undefined> {
  const output = await jobOutput(PHOTO_DERIVE_JOB, jobId).catch(() => undefined) as Partial<DeriveRefusal> | undefined
  return output?.refused ? new PhotoRejection(output.refused.status, output.refused.message) : undefined
}
