// What the test server stored, read the way the server reads it: from the test storage folder, or from the
// fake S3 bucket when the photo and archive tests run a second time against object storage (FINTRAIL_TEST_STORE=s3).
import { HeadObjectCommand, ListPartsCommand, S3Client } from '@aws-sdk/client-s3'
import type { FileStorage } from '../../server/storage/file-storage'
import { localStorage } from '../../server/storage/local-storage'
import { s3ClientConfig, s3Storage, type S3Settings } from '../../server/storage/s3-storage'
import { testEnv } from './env'

export const STORE = process.env.FINTRAIL_TEST_STORE === 's3' ? 's3' as const : 'local' as const
export const onS3 = STORE === 's3'

/** The bucket the S3 pass uses; the same variables reach every server the tests start (server.ts passes process.env on). */
export function testS3Settings(): S3Settings {
  return {
    bucket: process.env.NUXT_STORAGE_S3_BUCKET!,
    endpoint: process.env.NUXT_STORAGE_S3_ENDPOINT!,
    accessKeyId: process.env.NUXT_STORAGE_S3_ACCESS_KEY_ID!,
    secretAccessKey: process.env.NUXT_STORAGE_S3_SECRET_ACCESS_KEY!,
  }
}

let storage: FileStorage | undefined

/** A second bucket, for a second Fintrail with a database of its own (a shared bucket would be swept as strays). */
export const OTHER_BUCKET = 'fintrail-test-other'
/** Buckets of the backup test: the one backed up, and the empty one restored into. */
export const BACKUP_BUCKETS = ['fintrail-test-backup', 'fintrail-test-restored'] as const

export function bucketStorage(bucket: string) {
  return s3Storage({ ...testS3Settings(), bucket })
}

/** Where a second Fintrail keeps its files: a folder of its own, or a bucket of its own. */
export function otherStorage(folder: string): { env: Record<string, string>, storage: FileStorage } {
  if (onS3) return { env: { NUXT_STORAGE_S3_BUCKET: OTHER_BUCKET }, storage: s3Storage({ ...testS3Settings(), bucket: OTHER_BUCKET }) }
  return { env: { NUXT_STORAGE_DIR: folder }, storage: localStorage(folder) }
}

export function testStorage(): FileStorage {
  storage ??= onS3 ? s3Storage(testS3Settings()) : localStorage(testEnv().storageDir)
  return storage
}

/** Names stored under a prefix, one level down (`photos/derived/` gives photo ids and work folders). */
export async function storedNames(prefix: string, storage = testStorage()): Promise<string[]> {
  const names = new Set<string>()
  for await (const item of storage.list(prefix)) {
    const rest = item.key.slice(prefix.length)
    // In a bucket the uploads sit at the top, beside photos/: only names without a slash are uploads.
    if (prefix === storage.uploadsPrefix && rest.includes('/')) continue
    names.add(rest.split('/')[0]!)
  }
  return [...names].sort()
}

/** The upload's own objects: `<id>` and its info (`.json` in a folder, `.info` in a bucket), plus `.part` in a bucket. */
export async function storedUploadNames(uploadId: string) {
  return (await storedNames(testStorage().uploadsPrefix)).filter(name => name.startsWith(uploadId))
}

export const uploadInfoName = (uploadId: string) => testStorage().uploadInfoKey(uploadId).slice(testStorage().uploadsPrefix.length)

/**
 * Bytes of an unfinished upload that survive a crash of the server receiving it: the file so far in a folder;
 * in a bucket, the parts already stored (an incomplete part is only written when a request ends).
 */
export async function storedUploadBytes(uploadId: string): Promise<number> {
  const storage = testStorage()
  if (!onS3) return (await storage.stat(storage.uploadKey(uploadId)))?.size ?? 0
  const settings = testS3Settings()
  const client = new S3Client(s3ClientConfig(settings))
  try {
    const head = await client.send(new HeadObjectCommand({ Bucket: settings.bucket, Key: storage.uploadInfoKey(uploadId) }))
    const multipartId = head.Metadata?.['upload-id']
    if (!multipartId) return 0
    const parts = await client.send(new ListPartsCommand({ Bucket: settings.bucket, Key: uploadId, UploadId: multipartId })).catch(() => ({ Parts: [] }))
    const partial = (await storage.stat(`${uploadId}.part`))?.size ?? 0
    return (parts.Parts ?? []).reduce((sum, part) => sum + (part.Size ?? 0), 0) + partial
  }
  finally {
    client.destroy()
  }
}

/** Reads the upload's info object as JSON (tus's file store and s3 store both keep JSON with size, metadata, creation_date). */
export async function readUploadInfo(uploadId: string) {
  return JSON.parse((await testStorage().readBuffer(testStorage().uploadInfoKey(uploadId))).toString('utf8')) as Record<string, unknown>
}

export async function storedExists(key: string) {
  return (await testStorage().stat(key)) !== null
}
