import { randomUUID } from 'node:crypto'
import { createReadStream, createWriteStream } from 'node:fs'
import { mkdtemp, readdir, rm, stat } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import {
  CopyObjectCommand, DeleteObjectCommand, DeleteObjectsCommand, GetObjectCommand, HeadObjectCommand,
  ListObjectsV2Command, PutObjectCommand, S3Client, type S3ClientConfig,
} from '@aws-sdk/client-s3'
import { StorageUnavailable, notFound, type FileStorage, type StoredObject } from './file-storage'

export interface S3Settings {
  bucket: string
  /** Empty for AWS itself; the URL of any other S3-compatible service. */
  endpoint?: string
  region?: string
  /** Empty: the SDK's usual chain (AWS_ACCESS_KEY_ID, instance roles, …). */
  accessKeyId?: string
  secretAccessKey?: string
  /** `bucket` in the path rather than the host name: most self-hosted services want this. */
  forcePathStyle?: boolean
}

/** The client settings shared by our store and @tus/s3-store. */
export function s3ClientConfig(settings: S3Settings): S3ClientConfig {
  return {
    region: settings.region || 'us-east-1',
    ...(settings.endpoint ? { endpoint: settings.endpoint } : {}),
    forcePathStyle: settings.forcePathStyle ?? Boolean(settings.endpoint),
    ...(settings.accessKeyId && settings.secretAccessKey ? { credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey } } : {}),
    // Checksums only where S3 requires them: many S3-compatible services do not understand the newer trailers.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    maxAttempts: 2,
  }
}

function isMissing(error: unknown) {
  const e = error as { name?: string, $metadata?: { httpStatusCode?: number } }
  return e?.name === 'NoSuchKey' || e?.name === 'NotFound' || e?.$metadata?.httpStatusCode === 404
}

/** Objects in one bucket. Uploads are kept by @tus/s3-store at the top level (`<id>`, `<id>.info`). */
export function s3Storage(settings: S3Settings): FileStorage {
  const client = new S3Client(s3ClientConfig(settings))
  const Bucket = settings.bucket
  const place = `the bucket ${Bucket}${settings.endpoint ? ` at ${settings.endpoint}` : ''}`

  // Every failure but "no such object" means the store cannot be used right now.
  async function send<T>(work: () => Promise<T>, key?: string): Promise<T> {
    try {
      return await work()
    }
    catch (error) {
      if (key !== undefined && isMissing(error)) throw notFound(key)
      throw new StorageUnavailable(`${place} cannot be used: ${(error as Error)?.name ?? ''} ${(error as Error)?.message ?? error}`.trim(), { cause: error })
    }
  }

  async function get(key: string) {
    const response = await send(() => client.send(new GetObjectCommand({ Bucket, Key: key })), key)
    return response.Body as Readable
  }

  async function* list(prefix: string): AsyncGenerator<StoredObject> {
    let ContinuationToken: string | undefined
    do {
      const page = await send(() => client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix, ContinuationToken })))
      for (const item of page.Contents ?? []) {
        if (item.Key) yield { key: item.Key, size: item.Size ?? 0, modified: item.LastModified ?? new Date(0) }
      }
      ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined
    } while (ContinuationToken)
  }

  async function removeKeys(keys: string[]) {
    for (let i = 0; i < keys.length; i += 1000) {
      const Objects = keys.slice(i, i + 1000).map(Key => ({ Key }))
      await send(() => client.send(new DeleteObjectsCommand({ Bucket, Delete: { Objects, Quiet: true } })))
    }
  }

  async function putFile(key: string, path: string) {
    const { size } = await stat(path)
    await send(() => client.send(new PutObjectCommand({ Bucket, Key: key, Body: createReadStream(path), ContentLength: size })))
  }

  return {
    kind: 's3',
    description: place,
    uploadKey: uploadId => uploadId,
    uploadInfoKey: uploadId => `${uploadId}.info`,
    uploadsPrefix: '',

    async stat(key) {
      try {
        const head = await send(() => client.send(new HeadObjectCommand({ Bucket, Key: key })), key)
        return { size: head.ContentLength ?? 0, modified: head.LastModified ?? new Date(0) }
      }
      catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null
        throw error
      }
    },
    read: get,
    async readBuffer(key) {
      const body = await get(key)
      const chunks: Buffer[] = []
      for await (const chunk of body) chunks.push(chunk as Buffer)
      return Buffer.concat(chunks)
    },
    async localCopy(key) {
      const folder = await mkdtemp(join(tmpdir(), 'fintrail-object-'))
      const path = join(folder, 'object')
      const release = () => rm(folder, { recursive: true, force: true })
      try {
        await pipeline(await get(key), createWriteStream(path))
      }
      catch (error) {
        await release()
        throw error
      }
      return { path, release }
    },
    async put(key, body) {
      await send(() => client.send(new PutObjectCommand({ Bucket, Key: key, Body: body })))
    },
    putFile,
    async copy(from, to) {
      await send(() => client.send(new CopyObjectCommand({ Bucket, Key: to, CopySource: `${Bucket}/${from.split('/').map(encodeURIComponent).join('/')}` })), from)
    },
    workFolder: () => mkdtemp(join(tmpdir(), 'fintrail-derived-')),
    async replaceFolder(prefix, folder) {
      try {
        const names = await readdir(folder)
        const old: string[] = []
        for await (const item of list(prefix)) old.push(item.key)
        for (const name of names) await putFile(`${prefix}${name}`, join(folder, name))
        // Objects of the old set that the new one has no file for.
        await removeKeys(old.filter(key => !names.includes(key.slice(prefix.length))))
      }
      finally {
        await rm(folder, { recursive: true, force: true })
      }
    },
    async remove(key) {
      await send(() => client.send(new DeleteObjectCommand({ Bucket, Key: key })))
    },
    async removePrefix(prefix) {
      const keys: string[] = []
      for await (const item of list(prefix)) keys.push(item.key)
      await removeKeys(keys)
    },
    list,
    async writable() {
      const probe = `.write-probe-${randomUUID()}`
      try {
        await client.send(new PutObjectCommand({ Bucket, Key: probe, Body: 'ok' }))
        await client.send(new DeleteObjectCommand({ Bucket, Key: probe }))
        return true
      }
      catch {
        return false
      }
    },
  }
}
