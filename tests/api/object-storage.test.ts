// Only in the object-storage pass (FINTRAIL_TEST_STORE=s3, see vitest.config.ts): what is particular to a bucket.
import { execFile } from 'node:child_process'
import { randomUUID } from 'node:crypto'
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import pg from 'pg'
import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { MAIN_PORT, MAIN_URL, ROOT, testEnv } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { ALL_DERIVED, TUS, encodeMetadata, filesOf, makeJpeg, photoRows, sha256, storedSha256, tusRequest, tusUpload } from '../support/photos'
import { startServer } from '../support/server'
import { BACKUP_BUCKETS, bucketStorage, onS3, storedNames } from '../support/stored-files'

const run = promisify(execFile)

afterAll(closeTestDb)

describe.runIf(onS3)('photos in an S3-compatible bucket', () => {
  it('keeps the original and every size in the bucket, none in the storage folder, and serves them from there', async () => {
    const { client } = await signedInUser()
    const fish = await createFish(client, (await createPond(client)).id)
    const photo = await makeJpeg({ width: 1200, height: 900 })
    const { done } = tusUpload(MAIN_URL, client, photo, { metadata: { fishId: fish.id, filename: 'bucket.jpg', view: 'top' } })
    const { url, headers } = await done
    expect(headers['photo-state']).toBe('ready')
    const [row] = await photoRows('upload_id = $1', [url.split('/').pop()])
    expect(await storedSha256(`photos/originals/${row!.id}`)).toBe(sha256(photo))
    expect((await filesOf(row!.upload_id, row!.id)).derived).toEqual(ALL_DERIVED)
    expect(existsSync(join(testEnv().storageDir, 'photos', 'originals', row!.id))).toBe(false)
    expect(existsSync(join(testEnv().storageDir, 'uploads', row!.upload_id))).toBe(false)
    const served = await client.get(`/api/photos/${row!.id}/320.webp`)
    expect(served.status).toBe(200)
    expect((await client.get('/api/health')).body).toMatchObject({ ok: true, storage: 'ok' })
  })

  it('answers 503 "not writable" and stores nothing while the bucket cannot be reached', async () => {
    // An endpoint where nothing listens (a port of the test range no test uses in this pass).
    const server = await startServer(MAIN_PORT + 17, { NUXT_STORAGE_S3_ENDPOINT: `http://127.0.0.1:${MAIN_PORT + 16}` }, { acceptUnhealthy: true })
    try {
      const health = await new ApiClient(server.url).get('/api/health')
      expect(health.status).toBe(503)
      expect(health.body).toMatchObject({ ok: false, db: 'up', storage: 'not writable' })

      const { client } = await signedInUser()
      const fish = await createFish(client, (await createPond(client)).id)
      const before = await storedNames('')
      const created = await tusRequest(server.url, client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': '1000', 'Upload-Metadata': encodeMetadata({ fishId: fish.id, filename: 'nowhere.jpg' }) })
      expect(created.status).toBe(503)
      expect(created.text).toMatch(/cannot store files right now/)
      expect(await storedNames('')).toEqual(before)
    }
    finally {
      await server.stop()
    }
  })

  it('backs up the database and the bucket, and restores both into a new database and an empty bucket', async () => {
    const [liveBucket, restoredBucket] = BACKUP_BUCKETS
    const restoredDb = `fintrail_s3_restored_${randomUUID().slice(0, 8)}`
    const restoredUrl = testEnv().databaseUrl.replace(/\/[^/]+$/, `/${restoredDb}`)
    const scratch = mkdtempSync(join(tmpdir(), 'fintrail-s3-backup-'))
    const server = await startServer(MAIN_PORT + 11, { NUXT_STORAGE_S3_BUCKET: liveBucket, NUXT_JOBS_SCHEMA: 'pgboss_s3_backup' })
    try {
      const { client: mainClient } = await signedInUser()
      const client = mainClient.copy()
      client.baseUrl = server.url
      const fish = await createFish(client, (await createPond(client)).id)
      const photo = await makeJpeg({ width: 800, height: 600 })
      const { headers } = await tusUpload(server.url, client, photo, { metadata: { fishId: fish.id, filename: 'kept.jpg', view: 'left' } }).done
      expect(headers['photo-state']).toBe('ready')

      const backupFile = join(scratch, 'fintrail.tar')
      const env = { ...process.env, NUXT_DATABASE_URL: testEnv().databaseUrl, NUXT_STORAGE_S3_BUCKET: liveBucket }
      await run(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/backup.ts', backupFile], { cwd: ROOT, env })
      await admin(`create database ${restoredDb} owner fintrail`)
      const restoreEnv = { ...env, NUXT_DATABASE_URL: restoredUrl, NUXT_STORAGE_S3_BUCKET: restoredBucket }
      await run(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/restore.ts', backupFile], { cwd: ROOT, env: restoreEnv })

      const live = bucketStorage(liveBucket!)
      const restored = bucketStorage(restoredBucket!)
      const keys = async (storage: typeof live) => {
        const found: string[] = []
        for await (const item of storage.list('')) if (!item.key.startsWith('.write-probe-')) found.push(item.key)
        return found.sort()
      }
      const liveKeys = await keys(live)
      expect(liveKeys).toContain(`photos/originals/${headers['photo-id']}`)
      expect(await keys(restored)).toEqual(liveKeys)
      for (const key of liveKeys) expect((await restored.readBuffer(key)).equals(await live.readBuffer(key)), key).toBe(true)
      const db = new pg.Client({ connectionString: restoredUrl })
      await db.connect()
      const { rows } = await db.query('select sha256, state from photos where id = $1', [headers['photo-id']]).finally(() => db.end())
      expect(rows).toEqual([{ sha256: sha256(photo), state: 'ready' }])
      // Into a bucket that is no longer empty: refused rather than mixed in.
      await expect(run(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/restore.ts', backupFile], { cwd: ROOT, env: restoreEnv })).rejects.toThrow(/not empty/)
    }
    finally {
      await server.stop()
      await admin(`drop database if exists ${restoredDb} with (force)`)
      rmSync(scratch, { recursive: true, force: true })
    }
  }, 180_000)
})

async function admin(sql: string) {
  const client = new pg.Client({ connectionString: testEnv().databaseUrl.replace(/\/\/[^@]+@/, '//postgres@').replace(/\/[^/]+$/, '/postgres') })
  await client.connect()
  try {
    await client.query(sql)
  }
  finally {
    await client.end()
  }
}
