import type { Readable } from 'node:stream'

// Explicit imports only (no Nitro auto-imports): scripts/backup.ts and restore.ts use the same stores.

/** One stored object: its key (`photos/originals/<id>`), size and last change. */
export interface StoredObject {
  key: string
  size: number
  modified: Date
}

/** A local file holding an object's bytes, for tools that want a path (sharp, file-type); release removes a temporary copy. */
export interface LocalCopy {
  path: string
  release: () => Promise<void>
}

/**
 * Where photo originals, their derived sizes and tus uploads live: a folder (the default) or an
 * S3-compatible bucket. Keys use `/` and never start with one.
 */
export interface FileStorage {
  readonly kind: 'local' | 's3'
  /** A human-readable place for messages and the health check. */
  readonly description: string
  /** The bytes of a tus upload, and its info object beside them (the tus store's own names). */
  uploadKey: (uploadId: string) => string
  uploadInfoKey: (uploadId: string) => string
  /** Where upload keys are listed from. */
  readonly uploadsPrefix: string
  stat: (key: string) => Promise<{ size: number, modified: Date } | null>
  /** Throws an error with code ENOENT when the object does not exist. */
  read: (key: string) => Promise<Readable>
  readBuffer: (key: string) => Promise<Buffer>
  localCopy: (key: string) => Promise<LocalCopy>
  put: (key: string, body: Buffer | string) => Promise<void>
  putFile: (key: string, path: string) => Promise<void>
  /** Copies the bytes of one key to another (a hard link where the folder allows it). */
  copy: (from: string, to: string) => Promise<void>
  /**
   * Replaces everything under `prefix` with the files of a local folder, so readers see the old set or
   * the new one. `workFolder(prefix)` gives the folder to fill first.
   */
  workFolder: (prefix: string) => Promise<string>
  replaceFolder: (prefix: string, folder: string) => Promise<void>
  remove: (key: string) => Promise<void>
  removePrefix: (prefix: string) => Promise<void>
  /** Every object under a prefix, at any depth. */
  list: (prefix: string) => AsyncIterable<StoredObject>
  /** Writes and removes a small object: the check that also holds for full disks and read-only buckets. */
  writable: () => Promise<boolean>
}

export const originalKey = (photoId: string) => `photos/originals/${photoId}`
export const derivedPrefix = (photoId: string) => `photos/derived/${photoId}/`
export const derivedKey = (photoId: string, variant: string) => `photos/derived/${photoId}/${variant}`

/** The storage could not be used (not this file's fault): answered with 503 and retried later. */
export class StorageUnavailable extends Error {
  code = 'ESTORAGE'
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options)
    this.name = 'StorageUnavailable'
  }
}

export function notFound(key: string) {
  return Object.assign(new Error(`No stored object ${key}`), { code: 'ENOENT' })
}
