import type { FileStorage } from '../storage/file-storage'
import { localStorage } from '../storage/local-storage'
import { s3Storage, type S3Settings } from '../storage/s3-storage'

let storage: FileStorage | undefined

/** The S3 settings when a bucket is configured (NUXT_STORAGE_S3_BUCKET), else null: files stay in NUXT_STORAGE_DIR. */
export function s3Settings(): S3Settings | null {
  const config = useRuntimeConfig()
  const bucket = String(config.storageS3Bucket || '')
  if (!bucket) return null
  return {
    bucket,
    endpoint: String(config.storageS3Endpoint || '') || undefined,
    region: String(config.storageS3Region || '') || undefined,
    accessKeyId: String(config.storageS3AccessKeyId || '') || undefined,
    secretAccessKey: String(config.storageS3SecretAccessKey || '') || undefined,
    forcePathStyle: config.storageS3ForcePathStyle === '' ? undefined : String(config.storageS3ForcePathStyle) === 'true',
  }
}

/** Photo originals, derived sizes and uploads: the bucket when one is configured, else the storage folder. */
export function useFileStorage(): FileStorage {
  if (storage) return storage
  const s3 = s3Settings()
  storage = s3 ? s3Storage(s3) : localStorage(storageRoot())
  return storage
}
