import { existsSync, readdirSync } from 'node:fs'
import { join, resolve } from 'node:path'
import type { FileStorage } from '../../server/storage/file-storage'
import { s3Storage } from '../../server/storage/s3-storage'

export const MANIFEST_VERSION = 1
/** The folders of NUXT_STORAGE_DIR that hold the app's files (the rest may be databases, logs, backups). */
export const BACKUP_FOLDERS = ['uploads', 'photos']

export interface BackupManifest {
  version: number
  createdAt: string
  database: { file: string, bytes: number, sha256: string }
  files: { path: string, bytes: number, sha256: string }[]
  /** Where the files came from: paths in a folder (`photos/…`, `uploads/…`) or keys in a bucket. Absent: 'local'. */
  store?: 'local' | 's3'
}

/** The bucket when NUXT_STORAGE_S3_BUCKET is set (the same variables as the app), else null: the storage folder. */
export function bucketFromEnv(): FileStorage | null {
  const bucket = process.env.NUXT_STORAGE_S3_BUCKET
  if (!bucket) return null
  const pathStyle = process.env.NUXT_STORAGE_S3_FORCE_PATH_STYLE
  return s3Storage({
    bucket,
    endpoint: process.env.NUXT_STORAGE_S3_ENDPOINT || undefined,
    region: process.env.NUXT_STORAGE_S3_REGION || undefined,
    accessKeyId: process.env.NUXT_STORAGE_S3_ACCESS_KEY_ID || undefined,
    secretAccessKey: process.env.NUXT_STORAGE_S3_SECRET_ACCESS_KEY || undefined,
    forcePathStyle: pathStyle ? pathStyle === 'true' : undefined,
  })
}

/** A bucket's keys that are the app's files (the health check's probes are not). */
export const isAppObject = (key: string) => !key.startsWith('.write-probe-') && !key.endsWith('/')

/** NUXT_DATABASE_URL as the app reads it; without it, the database `npm start` runs (scripts/start.sh). */
export function databaseUrlFromEnv() {
  return process.env.NUXT_DATABASE_URL || process.env.DATABASE_URL || `postgres://fintrail@127.0.0.1:${process.env.FINTRAIL_PG_PORT || 54329}/fintrail`
}

export function storageDirFromEnv() {
  return resolve(process.env.NUXT_STORAGE_DIR || join(process.cwd(), 'storage'))
}

/** pg_dump / pg_restore of the newest PostgreSQL installed from Debian, or from PATH. */
export function postgresTool(name: 'pg_dump' | 'pg_restore') {
  const root = '/usr/lib/postgresql'
  const versions = existsSync(root) ? readdirSync(root).filter(v => /^\d+$/.test(v)).sort((a, b) => Number(b) - Number(a)) : []
  for (const version of versions) {
    const path = join(root, version, 'bin', name)
    if (existsSync(path)) return path
  }
  return name
}
