import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { MAIN_PORT, MAIN_URL } from '../support/env'
import { TEST_PASSWORD, createFish, createPond, signedInUser } from '../support/factories'
import { ALL_DERIVED, TUS, createUpload, filesOf, makeJpeg, makeTwentyMegabyteJpeg, photoRows, sha256, storedSha256, tusRequest } from '../support/photos'
import { startServer, type RunningServer } from '../support/server'

// Two built servers on two ports against one database and one storage folder (or one bucket, in the
// object-storage pass), as behind a load balancer: the main test server and a second one. Nothing a person does may depend on which one answers.
let second: RunningServer

beforeAll(async () => {
  // Looks for photos left half-done every 2 s instead of every minute.
  second = await startServer(MAIN_PORT + 10, { NUXT_PHOTO_RECOVERY_INTERVAL_SECONDS: '2' })
})

afterAll(async () => {
  await second?.stop()
  await closeTestDb()
})

/** The same person (same cookies) talking to the other instance. */
function onOther(client: ApiClient, baseUrl: string) {
  const other = new ApiClient(baseUrl, client.defaultHeaders)
  other.cookies = client.cookies
  return other
}

describe('two instances, one database and one storage folder', () => {
  it('a session made on one works on the other, and a sign-out on the other ends it on both', async () => {
    const { client, user } = await signedInUser()
    const there = onOther(client, second.url)
    const me = await there.get('/api/me')
    expect(me.status).toBe(200)
    expect(me.body).toMatchObject({ id: user.id })
    const pond = await createPond(there)
    expect((await client.get(`/api/ponds/${pond.id}`)).status).toBe(200)

    const stolen = new ApiClient(MAIN_URL)
    stolen.cookies = new Map(client.cookies)
    expect((await there.post('/api/auth/sign-out', {})).status).toBeLessThan(300)
    expect((await stolen.get('/api/me')).status).toBe(401)
  })

  it('failed sign-ins count across both: the limit is reached by failures spread over the two', async () => {
    const { email } = await signedInUser()
    const address = { 'x-forwarded-for': `10.77.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}` }
    const here = new ApiClient(MAIN_URL, address)
    const there = new ApiClient(second.url, address)
    // signInLimit is 10 per account and address (nuxt.config): five failures on each instance.
    for (let i = 0; i < 5; i++) {
      expect((await here.post('/api/auth/sign-in', { email, password: 'not the password at all' })).status).toBe(401)
      expect((await there.post('/api/auth/sign-in', { email, password: 'not the password at all' })).status).toBe(401)
    }
    const blockedHere = await here.post('/api/auth/sign-in', { email, password: TEST_PASSWORD })
    const blockedThere = await there.post('/api/auth/sign-in', { email, password: TEST_PASSWORD })
    expect(blockedHere.status).toBe(429)
    expect(blockedThere.status).toBe(429)
    expect(Number(blockedThere.headers.get('retry-after'))).toBeGreaterThan(0)
  })

  it('an upload started on one resumes on the other and stores exactly the bytes sent', async () => {
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const photo = await makeJpeg({ width: 1600, height: 1200 })
    const half = Math.floor(photo.length / 2)
    const { id, location } = await createUpload(MAIN_URL, client, photo.length, { fishId: fish.id, filename: 'two-hosts.jpg', view: 'top' })
    const path = new URL(location, MAIN_URL).pathname
    const patch = { 'Tus-Resumable': TUS, 'Content-Type': 'application/offset+octet-stream' }
    const first = await tusRequest(MAIN_URL, client, 'PATCH', path, { ...patch, 'Upload-Offset': '0' }, photo.subarray(0, half))
    expect(first.status).toBe(204)

    const head = await tusRequest(second.url, client, 'HEAD', path, { 'Tus-Resumable': TUS })
    expect(head.status).toBe(200)
    expect(Number(head.headers.get('upload-offset'))).toBe(half)
    const rest = await tusRequest(second.url, client, 'PATCH', path, { ...patch, 'Upload-Offset': String(half) }, photo.subarray(half))
    expect(rest.status, rest.text).toBe(204)
    expect(rest.headers.get('photo-state')).toBe('ready')

    const rows = await photoRows('upload_id = $1', [id])
    expect(rows).toHaveLength(1)
    expect(rows[0]!.sha256).toBe(sha256(photo))
    expect(await storedSha256(`photos/originals/${rows[0]!.id}`)).toBe(sha256(photo))
  })

  it('a photo whose instance is killed with SIGKILL while deriving it is finished by the other instance', async () => {
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const photo = await makeTwentyMegabyteJpeg()
    const doomed = await startServer(MAIN_PORT + 11)
    try {
      const { id, location } = await createUpload(doomed.url, client, photo.length, { fishId: fish.id, filename: 'killed-mid-way.jpg', view: 'top' })
      const path = new URL(location, doomed.url).pathname
      // The last PATCH derives the photo before it answers; the instance dies while the photo is pending.
      const patch = tusRequest(doomed.url, client, 'PATCH', path, { 'Tus-Resumable': TUS, 'Content-Type': 'application/offset+octet-stream', 'Upload-Offset': '0' }, photo).catch(() => null)
      for (let i = 0; i < 600 && (await photoRows('upload_id = $1', [id]))[0]?.state !== 'pending'; i++) await new Promise(r => setTimeout(r, 25))
      expect((await photoRows('upload_id = $1', [id]))[0]?.state).toBe('pending')
      await doomed.kill()
      await patch

      let rows = await photoRows('upload_id = $1', [id])
      for (let i = 0; i < 150 && rows[0]?.state !== 'ready'; i++) {
        await new Promise(r => setTimeout(r, 200))
        rows = await photoRows('upload_id = $1', [id])
      }
      expect(rows).toHaveLength(1)
      expect(rows[0]).toMatchObject({ state: 'ready', sha256: sha256(photo) })
      expect((await filesOf(id, rows[0]!.id)).derived).toEqual(ALL_DERIVED)
    }
    finally {
      await doomed.kill()
    }
  }, 180_000)
})
