import { readdir, rm, stat } from 'node:fs/promises'
import { join } from 'node:path'
import { and, eq, inArray, isNotNull, lt } from 'drizzle-orm'
import { RECOVERABLE_DAYS } from '#shared/utils/photo-limits'
import { PhotoRejection } from './photo-files'
import { deletePhotoFiles, finishUpload, resumePendingPhoto } from './photo-pipeline'
import { PHOTO_ID_PATTERN, UPLOAD_ID_PATTERN, storageRoot } from './photo-storage'
import type { StoredObject } from '../storage/file-storage'

interface UploadInfo { size?: number, metadata?: Record<string, string | null> }

// Work files younger than this may belong to a job running right now (in this or another process).
const STRAY_AFTER_MS = 60 * 60_000
// A received spreadsheet or pond archive (server/utils/spreadsheets.ts, api/ponds/import.post.ts) waiting to be read.
const RECEIVED_UPLOAD = /^(sheet-[0-9a-f-]{36}|import-[0-9a-f-]{36}\.zip)$/

async function listAll(prefix: string) {
  const found: StoredObject[] = []
  for await (const item of useFileStorage().list(prefix)) found.push(item)
  return found
}

/** Upload ids with something stored under their name, at the top of the uploads place (not in photos/). */
async function storedUploads() {
  const storage = useFileStorage()
  const uploads = (await listAll(storage.uploadsPrefix)).filter(item => !item.key.slice(storage.uploadsPrefix.length).includes('/'))
  return uploads.map(item => ({ ...item, name: item.key.slice(storage.uploadsPrefix.length) }))
}

/**
 * After a stop in the middle of the work: photos left pending are processed, and uploads whose
 * last byte arrived but whose photo was never made are finished now.
 */
export async function recoverInterruptedPhotos() {
  const pending = await useDb().select({ uploadId: schema.photos.uploadId }).from(schema.photos).where(eq(schema.photos.state, 'pending'))
  for (const { uploadId } of pending) await resumePendingPhoto(uploadId).catch(error => console.error('[photos] resume failed:', error))

  let finished = 0
  const storage = useFileStorage()
  const ids = (await storedUploads()).map(item => item.name).filter(name => UPLOAD_ID_PATTERN.test(name))
  for (const uploadId of ids) {
    // Both tus stores keep the info as JSON (size, metadata); in a bucket the bytes exist only once the last part arrived.
    const info = await storage.readBuffer(storage.uploadInfoKey(uploadId)).then(text => JSON.parse(text.toString('utf8')) as UploadInfo, () => null)
    const size = (await storage.stat(storage.uploadKey(uploadId)).catch(() => null))?.size
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
  const storage = useFileStorage()
  let swept = 0
  const now = Date.now()
  // Grouped by what they belong to: `photos/originals/<id>`, `photos/derived/<id>/…` or a work folder `<id>.tmp-…/…`.
  const groups = new Map<string, { name: string, keys: string[], newest: number }>()
  for (const prefix of ['photos/originals/', 'photos/derived/']) {
    for (const item of await listAll(prefix)) {
      const name = item.key.slice(prefix.length).split('/')[0]!
      const group = groups.get(prefix + name) ?? { name, keys: [], newest: 0 }
      group.keys.push(item.key)
      group.newest = Math.max(group.newest, item.modified.getTime())
      groups.set(prefix + name, group)
    }
  }
  const named = [...new Set([...groups.values()].map(group => group.name.split('.')[0]!).filter(id => PHOTO_ID_PATTERN.test(id)))]
  const known = new Set<string>()
  for (let i = 0; i < named.length; i += 500) {
    const rows = await useDb().select({ id: schema.photos.id }).from(schema.photos).where(inArray(schema.photos.id, named.slice(i, i + 500)))
    for (const row of rows) known.add(row.id)
  }
  for (const [place, group] of groups) {
    const id = group.name.split('.')[0]!
    // A half-written set of sizes, or a partial copy, older than any job could run.
    const isWork = group.name.includes('.tmp-') || group.name.endsWith('.partial')
    if (PHOTO_ID_PATTERN.test(id) && known.has(id) && !isWork) continue
    if ((isWork || !PHOTO_ID_PATTERN.test(id)) && now - group.newest < STRAY_AFTER_MS) continue
    if (place.startsWith('photos/derived/')) await storage.removePrefix(`${place}/`)
    else await storage.remove(place)
    swept++
  }
  // A request removes the file it received when it ends; one left in this instance's scratch folder was cut off by a stop.
  const received = join(storageRoot(), 'tmp')
  for (const name of await readdir(received).catch(() => [] as string[])) {
    const modified = (await stat(join(received, name)).catch(() => null))?.mtimeMs ?? now
    if (!RECEIVED_UPLOAD.test(name) || now - modified < STRAY_AFTER_MS) continue
    await rm(join(received, name), { force: true })
    swept++
  }
  // An upload's bytes without its info (or, in a folder, the reverse) cannot be resumed by anyone. In a bucket an
  // info without bytes is an upload in progress: its bytes appear only when the last part arrives.
  const uploads = await storedUploads()
  const names = new Set(uploads.map(item => item.name))
  const infoSuffix = storage.uploadInfoKey('x').slice(storage.uploadKey('x').length)
  for (const item of uploads) {
    const isInfo = item.name.endsWith(infoSuffix)
    const id = isInfo ? item.name.slice(0, -infoSuffix.length) : item.name
    if (!UPLOAD_ID_PATTERN.test(id)) continue
    if (isInfo && storage.kind === 's3') continue
    const partner = isInfo ? id : `${id}${infoSuffix}`
    if (names.has(partner)) continue
    if (now - item.modified.getTime() < STRAY_AFTER_MS) continue
    await storage.remove(item.key)
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

/** The pg-boss job of the purge, sent hourly by one schedule for all instances (and once at each start). */
export const PHOTO_PURGE_JOB = 'photos-purge'
export const PHOTO_PURGE_CRON = '0 * * * *'

export async function runPhotoPurge() {
  const result = await runPhotoMaintenance()
  if (result.purged || result.expiredUploads || result.strayFiles) console.log('[photos] maintenance:', JSON.stringify(result))
  return result
}
