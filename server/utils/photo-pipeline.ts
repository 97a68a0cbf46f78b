import { rm } from 'node:fs/promises'
import { and, desc, eq, isNull, sql } from 'drizzle-orm'
import pLimit from 'p-limit'
import { PHOTO_PROCESSING_CONCURRENCY } from '#shared/utils/photo-limits'
import type { PhotoRow } from '#shared/types/rows'
import { makeDerived, readPhotoHeader } from './photo-derive'
import { PHOTO_DERIVE_JOB, derivationRefusal, queuePhotoDerivation } from './photo-derive-job'
import { perProcessShare } from './process-share'
import { PhotoRejection, sha256OfFile, sniffPhotoType } from './photo-files'
import { derivedPrefix, originalKey, type LocalCopy } from '../storage/file-storage'

// Whole photo jobs (sniff, hash, decode, encode) run at most this many at once on the machine (split
// between the server processes when it runs one per core).
const photoJobs = pLimit(perProcessShare(PHOTO_PROCESSING_CONCURRENCY))

export const BUSY = 'busy' as const

/**
 * One job per upload at a time, across processes: a PostgreSQL advisory lock held on its own
 * connection. A process that dies mid-job loses the connection and with it the lock, so the next
 * start can take the job over. Returns BUSY when someone else holds it.
 */
async function withUploadLock<T>(uploadId: string, work: () => Promise<T>): Promise<T | typeof BUSY> {
  const client = await usePool().connect()
  let healthy = true
  try {
    const { rows } = await client.query<{ locked: boolean }>('select pg_try_advisory_lock(hashtextextended($1, 0)) as locked', [`photo-upload:${uploadId}`])
    if (!rows[0]?.locked) return BUSY
    try {
      return await work()
    }
    finally {
      await client.query('select pg_advisory_unlock(hashtextextended($1, 0))', [`photo-upload:${uploadId}`]).catch(() => (healthy = false))
    }
  }
  finally {
    // A connection that could not unlock is closed, which unlocks it.
    client.release(!healthy)
  }
}

export function runPhotoJob<T>(uploadId: string, work: () => Promise<T>) {
  return photoJobs(() => withUploadLock(uploadId, work))
}

/** The bytes tus stored, and its info beside them. */
export async function discardUpload(uploadId: string) {
  const storage = useFileStorage()
  await storage.remove(storage.uploadKey(uploadId))
  await storage.remove(storage.uploadInfoKey(uploadId))
  // @tus/s3-store's piece of a part smaller than the minimum, left when an upload was given up half-way.
  if (storage.kind === 's3') await storage.remove(`${uploadId}.part`)
}

/**
 * The original is a second name for the upload's bytes (a hard link in a folder, a server-side copy in a
 * bucket): tus keeps answering HEAD with "complete" until the upload expires, so a client whose last answer
 * was lost does not send the photo again.
 */
async function keepOriginal(uploadId: string, photoId: string) {
  const storage = useFileStorage()
  await storage.copy(storage.uploadKey(uploadId), originalKey(photoId))
}

export async function deletePhotoFiles(photo: Pick<PhotoRow, 'id' | 'uploadId'>) {
  const storage = useFileStorage()
  await storage.removePrefix(derivedPrefix(photo.id))
  await storage.remove(originalKey(photo.id))
  await discardUpload(photo.uploadId)
}

/** A photo whose file turned out unusable leaves nothing behind: no row, no original, no derived copies. */
async function dropPhoto(photo: PhotoRow) {
  await useDb().delete(schema.photos).where(eq(schema.photos.id, photo.id))
  await deletePhotoFiles(photo)
}

function describeFailure(error: unknown) {
  const code = (error as NodeJS.ErrnoException)?.code
  if (isStorageFault(error)) return `The server's storage could not be written (${code}). The upload is kept and will be retried by itself; you can also press Retry.`
  const detail = code ?? (error instanceof Error ? error.message.split('\n')[0]!.slice(0, 160) : 'unknown error')
  return `The server could not make the resized copies (${detail}). The photo itself is stored: press Retry.`
}

/** A fish with no profile picture gets its first ready photo. */
async function offerAsProfile(photo: PhotoRow) {
  await useDb().update(schema.fish).set({ profilePhotoId: photo.id })
    .where(and(eq(schema.fish.id, photo.fishId), isNull(schema.fish.profilePhotoId)))
}

/** Makes the derived copies of a stored photo. The caller holds the upload's lock. */
async function processPhoto(photo: PhotoRow, options: { retryOnStorageFault?: boolean } = {}): Promise<PhotoRow> {
  const storage = useFileStorage()
  let workDir: string | undefined
  try {
    if (!(await storage.stat(originalKey(photo.id)))) {
      // The process stopped between the row and the link, or the link could not be written: the upload's bytes are still there.
      if (await storage.stat(storage.uploadKey(photo.uploadId))) await keepOriginal(photo.uploadId, photo.id)
      else throw new PhotoRejection(410, 'The uploaded file was lost before it could be processed. Upload the photo again.')
    }
    workDir = await storage.workFolder(derivedPrefix(photo.id))
    const original = await storage.localCopy(originalKey(photo.id))
    let variants
    try {
      variants = await makeDerived(original.path, workDir)
    }
    finally {
      await original.release()
    }
    // Readers never see half a set of sizes: the row names the sizes only after all of them are stored.
    await storage.replaceFolder(derivedPrefix(photo.id), workDir)
    const [ready] = await useDb().update(schema.photos)
      .set({ state: 'ready', failureReason: null, variants, updatedAt: new Date() })
      .where(eq(schema.photos.id, photo.id)).returning()
    if (ready && !ready.removedAt) {
      await offerAsProfile(ready)
      // A photo from above becomes a reference for "which fish is this?": its features, once, in the background.
      await queuePhotoFeatures(ready)
    }
    return ready ?? photo
  }
  catch (error) {
    // Cleaning up must not hide why it failed (the folder may be the very thing that is broken).
    if (workDir) await rm(workDir, { recursive: true, force: true }).catch(() => undefined)
    if (error instanceof PhotoRejection) {
      await dropPhoto(photo)
      throw error
    }
    console.error(`[photos] processing ${photo.id} failed:`, error)
    // Never left pending: failed shows Retry, and a storage fault is retried by itself as well.
    const [failed] = await useDb().update(schema.photos)
      .set({ state: 'failed', failureReason: describeFailure(error), updatedAt: new Date() })
      .where(eq(schema.photos.id, photo.id)).returning()
    if (isStorageFault(error) && options.retryOnStorageFault !== false) await scheduleAutomaticRetry(photo.id)
    return failed ?? photo
  }
}

export interface FinishedUpload {
  photo: PhotoRow
  /** The same bytes were already a photo of this fish: that one is answered, nothing new is kept. */
  duplicate: boolean
  /** The job making the sizes of a photo accepted just now. */
  deriveJobId?: string
}

async function photoByUpload(uploadId: string) {
  const [row] = await useDb().select().from(schema.photos).where(eq(schema.photos.uploadId, uploadId)).limit(1)
  return row
}

async function livePhotoWithBytes(fishId: string, sha256: string) {
  const [row] = await useDb().select().from(schema.photos)
    .where(and(eq(schema.photos.fishId, fishId), eq(schema.photos.sha256, sha256), isNull(schema.photos.removedAt)))
    .limit(1)
  return row
}

/**
 * The same photo uploaded again keeps the caption typed this time: it fills an empty caption, or is
 * added after a different one, so words written at the pond side are never dropped.
 */
async function keepTypedCaption(photo: PhotoRow, typed: unknown): Promise<PhotoRow> {
  const words = String(typed ?? '').trim()
  if (!words || photo.caption.includes(words)) return photo
  const caption = (photo.caption ? `${photo.caption} — ${words}` : words).slice(0, 300)
  const [updated] = await useDb().update(schema.photos).set({ caption, updatedAt: new Date() }).where(eq(schema.photos.id, photo.id)).returning()
  return updated ?? photo
}

function isUniqueViolation(error: unknown) {
  const cause = (error as { cause?: unknown })?.cause ?? error
  return (cause as { code?: string })?.code === '23505'
}

/**
 * From a finished tus upload to a photo: checks that need no decoding first (type from the bytes,
 * size from the header), then the row, written 'pending' together with the job that makes its sizes
 * (server/utils/photo-derive-job.ts), which any instance may run. Safe to run again for the same upload
 * (the finish hook, a restart's recovery, a client whose last answer was lost): the upload id finds the same row.
 */
export function acceptUpload(uploadId: string, upload: { size: number, metadata: Record<string, string | null | undefined> }) {
  return runPhotoJob(uploadId, async (): Promise<FinishedUpload> => {
    const existing = await photoByUpload(uploadId)
    if (existing) return { photo: existing, duplicate: false }

    const storage = useFileStorage()
    let row: PhotoRow | undefined
    let bytes: LocalCopy | undefined
    try {
      // A path for file-type and sharp: the file itself in a folder, a temporary copy from a bucket.
      bytes = await storage.localCopy(storage.uploadKey(uploadId))
      const bytesPath = bytes.path
      const mime = await sniffPhotoType(bytesPath, upload.size)
      const header = await readPhotoHeader(bytesPath)
      const sha256 = await sha256OfFile(bytesPath)
      const fishId = String(upload.metadata.fishId)
      const duplicate = await livePhotoWithBytes(fishId, sha256)
      if (duplicate) {
        await discardUpload(uploadId)
        return { photo: await keepTypedCaption(duplicate, upload.metadata.caption), duplicate: true }
      }
      let deriveJobId: string | undefined
      try {
        // The row and its job commit together: no pending photo without someone to finish it.
        row = await useDb().transaction(async (tx) => {
          const [inserted] = await tx.insert(schema.photos).values({
            fishId,
            uploaderId: String(upload.metadata.uploaderId),
            uploadId,
            originalName: String(upload.metadata.filename ?? '').slice(0, 255),
            view: (upload.metadata.view ?? 'other') as PhotoRow['view'],
            caption: String(upload.metadata.caption ?? '').slice(0, 300),
            takenAt: header.takenAt,
            state: 'pending',
            mime,
            width: header.uprightWidth,
            height: header.uprightHeight,
            bytes: upload.size,
            sha256,
          }).returning()
          deriveJobId = await queuePhotoDerivation(inserted!.id, tx) ?? undefined
          return inserted!
        })
      }
      catch (error) {
        // Another upload of the same bytes to this fish won the race.
        if (!isUniqueViolation(error)) throw error
        const winner = await livePhotoWithBytes(fishId, sha256)
        if (!winner) throw error
        await discardUpload(uploadId)
        return { photo: await keepTypedCaption(winner, upload.metadata.caption), duplicate: true }
      }
      return { photo: row, duplicate: false, deriveJobId }
    }
    catch (error) {
      if (error instanceof PhotoRejection) {
        if (!row) await discardUpload(uploadId)
      }
      throw error
    }
    finally {
      await bytes?.release()
    }
  })
}

/**
 * The upload's last request: the photo is accepted, and the answer waits a little for its sizes (made by a job,
 * here or on another instance), so a photo is usually shown ready at once. Past `waitSeconds` it answers 'pending'
 * and the gallery shows "preparing" until the job is done.
 */
export async function finishUpload(uploadId: string, upload: { size: number, metadata: Record<string, string | null | undefined> }, options: { waitSeconds?: number } = {}) {
  const outcome = await acceptUpload(uploadId, upload)
  if (outcome === BUSY || outcome.duplicate || outcome.photo.state !== 'pending') return outcome
  wakeWorkers(PHOTO_DERIVE_JOB)
  const deadline = Date.now() + (options.waitSeconds ?? 0) * 1000
  let photo = outcome.photo
  for (let pause = 50; photo.state === 'pending' && Date.now() < deadline; pause = Math.min(pause * 2, 400)) {
    await new Promise(resolve => setTimeout(resolve, pause))
    const [row] = await useDb().select().from(schema.photos).where(eq(schema.photos.id, photo.id)).limit(1)
    if (row) {
      photo = row
      continue
    }
    // Gone while pending: the job refused the file (it cannot be decoded) and says why in its output.
    const refusal = outcome.deriveJobId ? await derivationRefusal(outcome.deriveJobId) : undefined
    if (refusal) throw refusal
    if (Date.now() >= deadline) break
  }
  return { ...outcome, photo }
}

/** Runs processing again for a failed (or interrupted) photo; a ready one is left as it is. */
/** `retryOnStorageFault: false` from the retry job itself, which pg-boss retries with backoff. */
export function retryPhoto(photo: PhotoRow, options: { retryOnStorageFault?: boolean } = {}) {
  return runPhotoJob(photo.uploadId, async () => {
    const [current] = await useDb().select().from(schema.photos).where(eq(schema.photos.id, photo.id)).limit(1)
    if (!current) throw new PhotoRejection(404, 'Photo not found')
    if (current.state === 'ready') return current
    const [pending] = await useDb().update(schema.photos).set({ state: 'pending', failureReason: null, updatedAt: new Date() })
      .where(eq(schema.photos.id, photo.id)).returning()
    return processPhoto(pending ?? current, options)
  })
}

/** After the profile picture is removed, the newest ready photo from above (else any view) takes its place. */
export async function replaceProfilePhoto(fishId: string, removedPhotoId: string) {
  const [next] = await useDb().select({ id: schema.photos.id }).from(schema.photos)
    .where(and(eq(schema.photos.fishId, fishId), eq(schema.photos.state, 'ready'), isNull(schema.photos.removedAt)))
    .orderBy(sql`(${schema.photos.view} = 'top') desc`, desc(sql`coalesce(${schema.photos.takenAt}, ${schema.photos.createdAt})`))
    .limit(1)
  await useDb().update(schema.fish).set({ profilePhotoId: next?.id ?? null, profileFocusX: null, profileFocusY: null })
    .where(and(eq(schema.fish.id, fishId), eq(schema.fish.profilePhotoId, removedPhotoId)))
}

/** Finishes a photo whose processing was cut off (the server stopped); others' jobs are left alone. */
export function resumePendingPhoto(uploadId: string) {
  return runPhotoJob(uploadId, async () => {
    const row = await photoByUpload(uploadId)
    return row?.state === 'pending' ? processPhoto(row) : row
  })
}
