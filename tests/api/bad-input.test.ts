import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { pondWithRoles, TEST_PASSWORD, uniqueEmail } from '../support/factories'
import { waitUntil } from '../support/mail'
import { encodeMetadata, makeJpeg, tusRequest, TUS } from '../support/photos'
import { startServer } from '../support/server'
import { daysAgo } from '../support/timeline'

afterAll(closeTestDb)

describe('ordinary bad input answers 4xx, never 500', () => {
  it('refuses a NUL character in any text field or query with 400 naming the field, and saves nothing', async () => {
    const { owner, pond, fish } = await pondWithRoles()
    const renamed = await owner.client.patch(`/api/ponds/${pond.id}`, { name: 'Lily\u0000pond' })
    expect(renamed.status).toBe(400)
    expect(renamed.body.data.fieldErrors).toHaveProperty('name')
    const entry = await owner.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: daysAgo(1), data: { signs: [], text: 'gasping\u0000' } })
    expect(entry.status).toBe(400)
    expect(entry.body.data.fieldErrors).toHaveProperty(['data.text'])
    const signUp = await new ApiClient().post('/api/auth/sign-up', { name: 'N\u0000', email: uniqueEmail('nul'), password: TEST_PASSWORD })
    expect(signUp.status).toBe(400)
    expect(signUp.body.data.fieldErrors).toHaveProperty('name')
    const search = await owner.client.get(`/api/ponds/${pond.id}/fish?q=%00koi`)
    expect(search.status).toBe(400)
    expect(search.body.data.fieldErrors).toHaveProperty('q')
    const { rows } = await testDb().query('select name from ponds where id = $1', [pond.id])
    expect(rows[0].name).toBe(pond.name)
  })

  it('refuses weights and lengths outside physical sense (minimums 0.1 g and 0.5 cm)', async () => {
    const { owner, fish } = await pondWithRoles()
    const post = (data: Record<string, unknown>) => owner.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(1), data })
    for (const data of [{ weightG: 1e-300 }, { lengthCm: 1e-300 }, { weightG: 0.09 }, { lengthCm: 0.4 }, { weightG: 5e-324, lengthCm: 30 }]) {
      const response = await post(data)
      expect(response.status, JSON.stringify(data)).toBe(400)
      expect(Object.keys(response.body.data.fieldErrors)[0]).toMatch(/^data\.(weightG|lengthCm)$/)
    }
    // The smallest sensible values are possible but implausible together (K far outside any fish): saved once the warning is acknowledged.
    const smallest = await owner.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(1), data: { weightG: 0.1, lengthCm: 0.5 }, acknowledgedWarnings: ['condition_factor'] })
    expect(smallest.status).toBe(201)
  })

  it('refuses an audit page marker that is not a real date or id (400)', async () => {
    const { owner, pond } = await pondWithRoles()
    for (const before of ['2026-13-45T99:99:99Z|00000000-0000-4000-8000-000000000000', '2026-02-30T10:00:00Z|00000000-0000-4000-8000-000000000000', '2026-01-01T10:00:00Z|------------------------------------']) {
      const response = await owner.client.get(`/api/ponds/${pond.id}/audit?before=${encodeURIComponent(before)}`)
      expect(response.status, before).toBe(400)
      expect(response.body.data.fieldErrors).toHaveProperty('before')
    }
    expect((await owner.client.get(`/api/ponds/${pond.id}/audit?before=${encodeURIComponent('2026-01-01T10:00:00.123456Z|00000000-0000-4000-8000-000000000000')}`)).status).toBe(200)
  })

  it('gives one 201 and seven 409 to eight sign-ups with one address at once', async () => {
    const email = uniqueEmail('race')
    const statuses = await Promise.all(Array.from({ length: 8 }, () => new ApiClient().post('/api/auth/sign-up', { name: 'Racer', email, password: TEST_PASSWORD }).then(r => r.status)))
    expect(statuses.sort()).toEqual([201, 409, 409, 409, 409, 409, 409, 409])
    const { rows } = await testDb().query('select count(*)::int as n from users where lower(email) = $1', [email])
    expect(rows[0].n).toBe(1)
  })
})

describe('an unwritable storage folder', () => {
  // A server of its own starts in these: generous time on a loaded machine.
  it('answers an upload with a clear 503, not a crash', { timeout: 90_000 }, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fintrail-storage-'))
    const notAFolder = join(dir, 'storage')
    writeFileSync(notAFolder, 'a file where the folder should be')
    const server = await startServer(MAIN_PORT + 4, { NUXT_STORAGE_DIR: notAFolder }, { acceptUnhealthy: true })
    try {
      const { owner, fish } = await pondWithRoles()
      const client = new ApiClient(server.url)
      client.cookies = new Map(owner.client.cookies)
      const bytes = await makeJpeg()
      const created = await tusRequest(server.url, client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': String(bytes.length), 'Upload-Metadata': encodeMetadata({ fishId: fish.id, filename: 'koi.jpg' }) })
      expect(created.status).toBe(503)
      expect(created.text).toMatch(/storage/i)
      // Still serving after it.
      expect((await client.get('/api/health')).body).toMatchObject({ db: 'up', storage: 'not writable' })
    }
    finally {
      await server.stop()
      rmSync(dir, { recursive: true, force: true })
    }
  })

  it('marks a photo whose final write failed as failed (not pending) and retries it by itself once the folder is writable', { timeout: 120_000 }, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fintrail-storage-'))
    // Uploads can be written, but where the originals go there is a file: the last step fails.
    const blocker = join(dir, 'photos')
    writeFileSync(blocker, 'in the way')
    // Its own job schema: a job must run on the server whose storage folder holds the upload.
    const server = await startServer(MAIN_PORT + 5, { NUXT_STORAGE_DIR: dir, NUXT_PHOTO_RETRY_DELAY_SECONDS: '1', NUXT_JOBS_SCHEMA: 'pgboss_storage_test' })
    try {
      const { owner, fish } = await pondWithRoles()
      const client = new ApiClient(server.url)
      client.cookies = new Map(owner.client.cookies)
      const bytes = await makeJpeg()
      const created = await tusRequest(server.url, client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': String(bytes.length), 'Upload-Metadata': encodeMetadata({ fishId: fish.id, filename: 'koi.jpg' }) })
      expect(created.status).toBe(201)
      const finished = await tusRequest(server.url, client, 'PATCH', new URL(created.headers.get('location')!, server.url).pathname, { 'Tus-Resumable': TUS, 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream' }, bytes)
      expect(finished.status, finished.text).toBe(204)
      expect(finished.headers.get('photo-state')).toBe('failed')
      const photoId = finished.headers.get('photo-id')!
      const { rows } = await testDb().query('select state, failure_reason from photos where id = $1', [photoId])
      expect(rows[0]).toMatchObject({ state: 'failed', failure_reason: expect.stringMatching(/retried/i) })
      rmSync(blocker)
      const ready = await waitUntil(() => testDb().query('select state from photos where id = $1', [photoId]).then(r => r.rows[0].state), state => state === 'ready', 45_000)
      expect(ready).toBe('ready')
    }
    finally {
      await server.stop()
      rmSync(dir, { recursive: true, force: true })
    }
  })
})
