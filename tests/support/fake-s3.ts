// A local S3-compatible store for the tests: s3rver (files in a folder, real S3 HTTP and signatures) plus the
// three multipart calls @tus/s3-store needs and s3rver 4.0.4 does not answer (ListParts, AbortMultipartUpload,
// ListMultipartUploads). They read s3rver's own upload folders, so they see exactly what UploadPart wrote.
import { readdir, readFile, rm, stat } from 'node:fs/promises'
import { join } from 'node:path'
import S3rver from '@20minutes/s3rver'

export const FAKE_S3_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' }

interface KoaContext {
  method: string
  path: string
  query: Record<string, string | undefined>
  status: number
  body: unknown
  type: string
}

function multipartCalls(root: string) {
  const uploadsOf = (bucket: string) => join(root, bucket, '._S3rver_uploads')
  return async (ctx: KoaContext, next: () => Promise<void>) => {
    const [, bucket = '', ...rest] = ctx.path.split('/')
    const key = decodeURIComponent(rest.join('/'))
    const uploadId = ctx.query.uploadId
    if (ctx.method === 'GET' && key && uploadId !== undefined) {
      const folder = join(uploadsOf(bucket), uploadId)
      const names = await readdir(folder).catch(() => null)
      if (!names) return noSuchUpload(ctx)
      const numbers = names.filter(name => /^\d+$/.test(name)).map(Number).sort((a, b) => a - b)
      const Part = await Promise.all(numbers.map(async number => ({
        PartNumber: number,
        ETag: `"${(await readFile(join(folder, `${number}.md5`), 'utf8')).trim()}"`,
        Size: (await stat(join(folder, String(number)))).size,
        LastModified: (await stat(join(folder, String(number)))).mtime.toISOString(),
      })))
      ctx.body = { ListPartsResult: { Bucket: bucket, Key: key, UploadId: uploadId, MaxParts: 10000, IsTruncated: false, Part } }
      return
    }
    if (ctx.method === 'DELETE' && key && uploadId !== undefined) {
      const folder = join(uploadsOf(bucket), uploadId)
      if (!(await stat(folder).catch(() => null))) return noSuchUpload(ctx)
      await rm(folder, { recursive: true, force: true })
      ctx.status = 204
      return
    }
    if (ctx.method === 'GET' && !key && bucket && ctx.query.uploads !== undefined) {
      const ids = await readdir(uploadsOf(bucket)).catch(() => [] as string[])
      const Upload = await Promise.all(ids.map(async id => ({
        Key: await readFile(join(uploadsOf(bucket), id, 'key'), 'utf8'),
        UploadId: id,
        Initiated: (await stat(join(uploadsOf(bucket), id))).birthtime.toISOString(),
      })))
      ctx.body = { ListMultipartUploadsResult: { Bucket: bucket, IsTruncated: false, Upload } }
      return
    }
    await next()
  }
}

function noSuchUpload(ctx: KoaContext) {
  ctx.status = 404
  ctx.body = { Error: { Code: 'NoSuchUpload', Message: 'The specified upload does not exist.' } }
}

export interface FakeS3 {
  endpoint: string
  stop: () => Promise<void>
}

export async function startFakeS3(port: number, directory: string, buckets: string[]): Promise<FakeS3> {
  const s3 = new S3rver({ port, address: '127.0.0.1', directory, silent: true, allowMismatchedSignatures: true, configureBuckets: buckets.map(name => ({ name })) })
  // After s3rver's logger and XML writer (so our answers are written as XML too), before its routes.
  ;(s3 as unknown as { middleware: unknown[] }).middleware.splice(2, 0, multipartCalls(directory))
  await s3.run()
  return {
    endpoint: `http://127.0.0.1:${port}`,
    stop: async () => {
      await s3.close()
    },
  }
}
