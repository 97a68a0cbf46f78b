import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT, MAIN_URL } from '../support/env'
import { TEST_PASSWORD, createFish, createPond, signedInUser } from '../support/factories'
import { ALL_DERIVED, TUS, createUpload, filesOf, makeJpeg, makeTwentyMegabyteJpeg, photoRows, sha256, storedSha256, tusRequest, tusUpload } from '../support/photos'
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
      // The last PATCH writes the photo pending with its job and waits for the sizes; the instance dies meanwhile.
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

/** The photo-derive jobs (in the test server's job schema) of these photos, by state. */
async function deriveJobStates(photoIds: string[]) {
  const { rows } = await testDb().query<{ state: string }>('select state from pgboss.job where name = \'photo-derive\' and data->>\'photoId\' = any($1) order by state', [photoIds])
  return rows.map(row => row.state)
}

/**
 * The derive jobs' states once each has completed, or as they stand after 45 s. A job that found its photo's upload
 * locked by another worker (the recovery sweep, or an instance that died holding it) is retried after its back-off
 * (PHOTO_DERIVE_JOB: 5 s, doubling) and then completes at once, finding the photo made: the photo can be ready while
 * its job still waits for that retry.
 */
async function untilJobsCompleted(photoIds: string[]) {
  let states = await deriveJobStates(photoIds)
  for (let i = 0; i < 225 && !states.every(state => state === 'completed'); i++) {
    await new Promise(r => setTimeout(r, 200))
    states = await deriveJobStates(photoIds)
  }
  return states
}

async function untilReady(where: string, params: unknown[], count: number) {
  let rows = await photoRows(where, params)
  for (let i = 0; i < 300 && !(rows.length === count && rows.every(row => row.state === 'ready')); i++) {
    await new Promise(r => setTimeout(r, 200))
    rows = await photoRows(where, params)
  }
  return rows
}

describe('photo work as jobs any instance may run', () => {
  it('an upload finished on an instance with no photo workers is answered pending and made ready by another', async () => {
    // This instance takes uploads but leaves the sizes to the others, and answers without waiting for them.
    const lender = await startServer(MAIN_PORT + 12, { NUXT_PHOTO_DERIVE_WORKERS: '0', NUXT_PHOTO_FINISH_WAIT_SECONDS: '0', NUXT_PHOTO_RECOVERY_INTERVAL_SECONDS: '0' })
    try {
      const { client } = await signedInUser()
      const there = onOther(client, lender.url)
      const fish = await createFish(there, (await createPond(there)).id)
      const photo = await makeJpeg({ width: 1600, height: 1200 })
      const { headers } = await tusUpload(lender.url, there, photo, { metadata: { fishId: fish.id, filename: 'made-elsewhere.jpg', view: 'top' } }).done
      expect(headers['photo-state']).toBe('pending')
      const photoId = headers['photo-id']!
      expect(photoId).toMatch(/^[0-9a-f-]{36}$/)
      // The gallery lists it at once, as pending ("preparing"), until a worker elsewhere is done.
      const listed = (await there.get(`/api/fish/${fish.id}/photos`)).body as { photos: { id: string, state: string }[] }
      expect(listed.photos.find(p => p.id === photoId)?.state).toMatch(/^(pending|ready)$/)

      const rows = await untilReady('id = $1', [photoId], 1)
      expect(rows[0]).toMatchObject({ state: 'ready', sha256: sha256(photo) })
      expect((await filesOf(rows[0]!.upload_id, photoId)).derived).toEqual(ALL_DERIVED)
      expect(await untilJobsCompleted([photoId])).toEqual(['completed'])

      // The same bytes again: still "already in the gallery", answered with the one photo.
      const again = await tusUpload(lender.url, there, photo, { metadata: { fishId: fish.id, filename: 'made-elsewhere.jpg', view: 'top' } }).done
      expect(again.headers).toMatchObject({ 'photo-id': photoId, 'photo-duplicate': 'yes', 'photo-state': 'ready' })
    }
    finally {
      await lender.stop()
    }
  }, 180_000)

  it('the photos of an archive imported on an instance killed with SIGKILL right after are made by another', async () => {
    const { client } = await signedInUser()
    const fish = await createFish(client, (await createPond(client, { name: 'Exported pond' })).id)
    const bytes = [await makeJpeg({ width: 900, height: 700 }), await makeJpeg({ width: 700, height: 900, sigma: 60 })]
    for (const [i, photo] of bytes.entries()) {
      const { headers } = await tusUpload(MAIN_URL, client, photo, { metadata: { fishId: fish.id, filename: `archived-${i}.jpg`, view: 'top' } }).done
      expect(headers['photo-state']).toBe('ready')
    }
    const exported = await fetch(`${MAIN_URL}/api/ponds/${fish.pondId}/export`, { headers: { cookie: client.cookieHeader() } })
    expect(exported.status).toBe(200)
    const archive = Buffer.from(await exported.arrayBuffer())

    // The importing instance makes no sizes itself and dies as soon as it has answered: only the jobs it committed remain.
    const doomed = await startServer(MAIN_PORT + 12, { NUXT_PHOTO_DERIVE_WORKERS: '0', NUXT_PHOTO_RECOVERY_INTERVAL_SECONDS: '0' })
    let pondId: string
    try {
      const imported = await fetch(`${doomed.url}/api/ponds/import`, { method: 'POST', headers: { 'content-type': 'application/zip', 'cookie': client.cookieHeader() }, body: archive })
      const body = await imported.json() as { pondId: string }
      expect(imported.status, JSON.stringify(body)).toBe(201)
      pondId = body.pondId
    }
    finally {
      await doomed.kill()
    }

    const where = 'fish_id in (select id from fish where pond_id = $1)'
    const rows = await untilReady(where, [pondId], 2)
    expect(rows.map(row => row.state)).toEqual(['ready', 'ready'])
    expect(rows.map(row => row.sha256).sort()).toEqual(bytes.map(sha256).sort())
    for (const row of rows) expect((await filesOf(row.upload_id, row.id)).derived).toEqual(ALL_DERIVED)
    const ids = rows.map(row => row.id)
    expect(await untilJobsCompleted(ids)).toEqual(['completed', 'completed'])
  }, 180_000)

  it('the hourly purge is one pg-boss schedule for all instances, and has run since they started', async () => {
    const { rows } = await testDb().query('select name, cron, timezone from pgboss.schedule where name = \'photos-purge\'')
    expect(rows).toEqual([{ name: 'photos-purge', cron: '0 * * * *', timezone: 'UTC' }])
    // Each start sends one purge as well ('stately': at most one waiting and one running at a time).
    let states: string[] = []
    for (let i = 0; i < 100; i++) {
      states = (await testDb().query<{ state: string }>('select state from pgboss.job where name = \'photos-purge\'')).rows.map(row => row.state)
      if (states.includes('completed')) break
      await new Promise(r => setTimeout(r, 200))
    }
    expect(states).toContain('completed')
    expect(states.filter(state => state === 'created').length).toBeLessThanOrEqual(1)
    expect(states.filter(state => state === 'active').length).toBeLessThanOrEqual(1)
  })
})
