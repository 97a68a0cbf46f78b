import { resolve, join } from 'node:path'

// Where photo bytes live. Nothing here is under public/: every byte leaves through an authorised route.
export function storageRoot() {
  return resolve(String(useRuntimeConfig().storageDir || '') || join(process.cwd(), 'storage'))
}

/** tus writes here: `<uploadId>` (the bytes) and `<uploadId>.json` (size, metadata, creation date). */
export function uploadsDir() {
  return join(storageRoot(), 'uploads')
}

/** The photo as uploaded, GPS and all: kept for reprocessing, never served. */
export function originalsDir() {
  return join(storageRoot(), 'photos', 'originals')
}

export function derivedRoot() {
  return join(storageRoot(), 'photos', 'derived')
}

export function originalPath(photoId: string) {
  return join(originalsDir(), photoId)
}

export function derivedDir(photoId: string) {
  return join(derivedRoot(), photoId)
}

export function uploadPath(uploadId: string) {
  return join(uploadsDir(), uploadId)
}

/** tus ids are 32 hex characters (crypto.randomBytes(16)); anything else never names a stored upload. */
export const UPLOAD_ID_PATTERN = /^[0-9a-f]{32}$/

/** Photo ids are UUIDs; a file name that is not one is not ours. */
export const PHOTO_ID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/
