import { resolve, join } from 'node:path'

// Where photo bytes live when no bucket is configured (see file-storage.ts). Nothing here is under public/:
// every byte leaves through an authorised route.
export function storageRoot() {
  return resolve(String(useRuntimeConfig().storageDir || '') || join(process.cwd(), 'storage'))
}

/** tus's file store writes here: `<uploadId>` (the bytes) and `<uploadId>.json` (size, metadata, creation date). */
export function uploadsDir() {
  return join(storageRoot(), 'uploads')
}

/** tus ids are 32 hex characters (crypto.randomBytes(16)); anything else never names a stored upload. */
export const UPLOAD_ID_PATTERN = /^[0-9a-f]{32}$/

/** Photo ids are UUIDs; a file name that is not one is not ours. */
export const PHOTO_ID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/
