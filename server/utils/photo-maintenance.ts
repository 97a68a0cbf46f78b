import { readdir, readFile, rm, stat } from 'node:fs/promises'
import { join } from 'node:path'
import { and, eq, inArray, isNotNull, lt } from 'drizzle-orm'
import { RECOVERABLE_DAYS } from '#shared/utils/photo-limits'
import { PhotoRejection } from './photo-files'
import { deletePhotoFiles, finishUpload, resumePendingPhoto } from './photo-pipeline'
import { PHOTO_ID_PATTERN, UPLOAD_ID_PATTERN, derivedRoot, originalsDir, storageRoot, uploadPath, uploadsDir } from './photo-storage'

// Work files younger than this may belong to a job running right now (in this or another process).
const STRAY_AFTER_MS = 60 * 60_000
// A received spreadsheet or pond archive (server/utils/spreadsheets.ts, api/ponds/import.post.ts) waiting to be read.
const RECEIVED_UPLOAD = /^(sheet-[0-9a-f-]{36}|import-[0-9a-f-]{36}\.zip)$/

async function list(dir: string) {
  return readdir(dir).catch(() => [] as string[])
}

async function ageMs(path: string) {
  const info = await stat(path).catch(() => null)
  return info ? Date.now() - info.mtimeMs : 0
}

interface UploadInfo { size?: number, metadata?: Record<string, string | null> }

async function readUploadInfo(uploadId: string): Promise<UploadInfo | null> {
  return readFile(`${uploadPath(uploadId)}.json`, 'utf8').then(text => JSON.parse(text) as UploadInfo, () => null)
}

/**
 * After a stop in the middle of the work: photos left pending are processed, and uploads whose
 * last byte arrived but whose photo was never made are finished now.
 */
export async function recoverInterruptedPhotos() {
  const pending = await useDb().select({ uploadId: schema.photos.uploadId }).from(schema.photos).where(eq(schema.photos.state, 'pending'))
  for (const { uploadId } of pending) await resumePendingPhoto(uploadId).catch(error => console.error('[photos] resume failed:', error))

  let finished = 0
  const ids = (await list(uploadsDir())).filter(name => UPLOAD_ID_PATTERN.test(name))
  for (const uploadId of ids) {
    const info = await readUploadInfo(uploadId)
    const size = (await stat(uploadPath(uploadId)).catch(() => null))?.size
    if (!info?.metadata?.uploaderId || !info.size || size !== info.size) continue
    const [known] = await useDb().select({ id: schema.photos.id }).from(schema.photos).where(eq(schema.photos.uploadId, uploadId)).limit(1)
    if (known) continue
    await finishUpload(uploadId, { size, metadata: info.metadata }).then(() => finished++, (error) => {
      if (!(error instanceof PhotoRejection)) console.error('[photos] finishing upload failed:', error)
    })
  }
  return { resumed: pending.length, finished }
}

/** Photos removed more than 30 days ago: the row first, then the bytes (a crash in between leaves only strays, swept below). */
async function purgeRemovedPhotos() {
  const cutoff = new Date(Date.now() - RECOVERABLE_DAYS * 86_400_000)
  const expired = await useDb().select().from(schema.photos)
    .where(and(isNotNull(schema.photos.removedAt), lt(schema.photos.removedAt, cutoff)))
  let purged = 0
  for (const photo of expired) {
    try {
      await useDb().transaction(async (tx) => {
        await tx.update(schema.fish).set({ profilePhotoId: null, profileFocusX: null, profileFocusY: null }).where(eq(schema.fish.profilePhotoId, photo.id))
        await tx.delete(schema.photos).where(eq(schema.photos.id, photo.id))
      })
    }
    catch (error) {
      // A timeline entry pointing at the photo keeps it: the record is kept for life.
      console.error(`[photos] could not purge ${photo.id}:`, (error as Error).message)
      continue
    }
    await deletePhotoFiles(photo)
    purged++
  }
  return purged
}

/** Files no row accounts for: left by a crash between two steps, never by a finished job. */
async function sweepStrayFiles() {
  let swept = 0
  const originals = (await list(originalsDir()))
  const derived = (await list(derivedRoot()))
  const named = [...new Set([...originals, ...derived].map(name => name.split('.')[0]!).filter(id => PHOTO_ID_PATTERN.test(id)))]
  const known = new Set<string>()
  for (let i = 0; i < named.length; i += 500) {
    const rows = await useDb().select({ id: schema.photos.id }).from(schema.photos).where(inArray(schema.photos.id, named.slice(i, i + 500)))
    for (const row of rows) known.add(row.id)
  }
  for (const [dir, names] of [[originalsDir(), originals], [derivedRoot(), derived]] as const) {
    for (const name of names) {
      const path = join(dir, name)
      const id = name.split('.')[0]!
      // A half-written set of sizes, or a partial copy, older than any job could run.
      const isWork = name.includes('.tmp-') || name.endsWith('.partial')
      if (PHOTO_ID_PATTERN.test(id) && known.has(id) && !isWork) continue
      if (isWork && (await ageMs(path)) < STRAY_AFTER_MS) continue
      if (!PHOTO_ID_PATTERN.test(id) && (await ageMs(path)) < STRAY_AFTER_MS) continue
      await rm(path, { recursive: true, force: true })
      swept++
    }
  }
  // A request removes the file it received when it ends; one left here was cut off by a stop of the server.
  const received = join(storageRoot(), 'tmp')
  for (const name of await list(received)) {
    if (!RECEIVED_UPLOAD.test(name) || (await ageMs(join(received, name))) < STRAY_AFTER_MS) continue
    await rm(join(received, name), { force: true })
    swept++
  }
  // An upload's bytes without its .json (or the reverse) cannot be resumed by anyone.
  const uploads = await list(uploadsDir())
  const names = new Set(uploads)
  for (const name of uploads) {
    const id = name.replace(/\.json$/, '')
    if (!UPLOAD_ID_PATTERN.test(id)) continue
    const partner = name.endsWith('.json') ? id : `${id}.json`
    if (names.has(partner)) continue
    if ((await ageMs(join(uploadsDir(), name))) < STRAY_AFTER_MS) continue
    await rm(join(uploadsDir(), name), { force: true })
    swept++
  }
  return swept
}

/** The hourly job: removed photos past 30 days, unfinished uploads past their expiry, stray files. */
export async function runPhotoMaintenance() {
  const purged = await purgeRemovedPhotos()
  const expiredUploads = await useTusServer().cleanUpExpiredUploads()
  const strayFiles = await sweepStrayFiles()
  return { purged, expiredUploads, strayFiles }
}
