import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, utimesSync, writeFileSync } from 'node:fs'
import { randomBytes, randomUUID } from 'node:crypto'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT, MAIN_URL, testEnv } from '../support/env'
import { createFish, pondWithRoles } from '../support/factories'
import { ALL_DERIVED, TUS, createUpload, filesOf, makeJpeg, photoRows, sha256, strayFiles, tusRequest, tusUpload } from '../support/photos'
import { onS3, readUploadInfo, storedExists, storedNames, testStorage } from '../support/stored-files'
import { startServer } from '../support/server'

let world: Awaited<ReturnType<typeof pondWithRoles>>
type Who = 'owner' | 'keeper' | 'vet' | 'outsider' | 'anonymous'
const client = (who: Who): ApiClient => world[who].client

beforeAll(async () => {
  world = await pondWithRoles()
})
afterAll(closeTestDb)

async function addPhoto(options: { who?: Who, fishId?: string, bytes?: Buffer, view?: string, caption?: string, baseUrl?: string } = {}) {
  const bytes = options.bytes ?? await makeJpeg({ width: 640, height: 480 })
  const metadata: Record<string, string> = { fishId: options.fishId ?? world.fish.id, filename: 'photo.jpg', view: options.view ?? 'other' }
  if (options.caption) metadata.caption = options.caption
  const result = await tusUpload(options.baseUrl ?? MAIN_URL, client(options.who ?? 'owner'), bytes, { metadata }).done
  return { id: result.headers['photo-id']!, state: result.headers['photo-state']!, duplicate: result.headers['photo-duplicate'], url: result.url, bytes }
}

async function gallery(who: Who, fishId = world.fish.id) {
  return client(who).get(`/api/fish/${fishId}/photos`)
}

describe('gallery', () => {
  it('lists photos newest first by the date taken (EXIF), the upload time standing in', async () => {
    const fish = await createFish(client('owner'), world.pond.id)
    const older = await addPhoto({ fishId: fish.id, bytes: await makeJpeg({ takenAt: '2023:06:01 09:30:00' }), view: 'top', caption: 'Spring check' })
    const undated = await addPhoto({ fishId: fish.id, view: 'left' })
    const newer = await addPhoto({ fishId: fish.id, bytes: await makeJpeg({ takenAt: '2024:01:15 12:00:00' }), view: 'closeup' })
    const response = await gallery('vet', fish.id)
    expect(response.status).toBe(200)
    const photos = response.body.photos as { id: string, takenAt: string | null, uploadedAt: string, view: string, caption: string, state: string, uploaderName: string, isProfile: boolean }[]
    expect(photos.map(p => p.id)).toEqual([undated.id, newer.id, older.id])
    expect(photos[0]!.takenAt).toBeNull()
    expect(photos[1]!.takenAt).toBe('2024-01-15T12:00:00.000Z')
    expect(photos[2]).toMatchObject({ view: 'top', caption: 'Spring check', state: 'ready', uploaderName: 'Owner', takenAt: '2023-06-01T09:30:00.000Z' })
    // The first ready photo became the fish's profile picture, shown on its card.
    expect(photos.find(p => p.isProfile)!.id).toBe(older.id)
    const cards = (await client('keeper').get(`/api/ponds/${world.pond.id}/fish`)).body as { id: string, profilePhotoId: string | null }[]
    expect(cards.find(card => card.id === fish.id)!.profilePhotoId).toBe(older.id)
    expect(response.body).toMatchObject({ canUpload: true, canSetProfile: false, removed: [] })
  })

  it.each([['owner', 200], ['keeper', 200], ['vet', 200], ['outsider', 404], ['anonymous', 401]] as const)('answers the list to %s with %i', async (who, status) => {
    expect((await gallery(who)).status).toBe(status)
  })

  it('keeps the same bytes on one fish once: the second upload answers the first photo', async () => {
    const first = await addPhoto()
    const again = await addPhoto({ bytes: first.bytes, who: 'keeper' })
    expect(again).toMatchObject({ id: first.id, duplicate: 'yes', state: 'ready' })
    expect(await photoRows('fish_id = $1 and sha256 = $2', [world.fish.id, sha256(first.bytes)])).toHaveLength(1)
    expect((await filesOf(again.url.split('/').pop()!)).upload).toEqual([])
    const otherFish = await createFish(client('owner'), world.pond.id)
    const elsewhere = await addPhoto({ bytes: first.bytes, fishId: otherFish.id })
    expect(elsewhere.id).not.toBe(first.id)
  })

  it('keeps the caption typed with the second upload of the same photo', async () => {
    const fish = await createFish(client('owner'), world.pond.id)
    const first = await addPhoto({ fishId: fish.id })
    const captionOf = async () => (await photoRows('id = $1', [first.id]))[0]!.caption
    expect(await captionOf()).toBe('')
    expect(await addPhoto({ fishId: fish.id, bytes: first.bytes, caption: 'Red patch behind the head' })).toMatchObject({ id: first.id, duplicate: 'yes' })
    expect(await captionOf()).toBe('Red patch behind the head')
    await addPhoto({ fishId: fish.id, bytes: first.bytes, caption: 'Seen from above at the spring check' })
    expect(await captionOf()).toBe('Red patch behind the head — Seen from above at the spring check')
    // The same words again add nothing.
    await addPhoto({ fishId: fish.id, bytes: first.bytes, caption: 'Red patch behind the head' })
    expect(await captionOf()).toBe('Red patch behind the head — Seen from above at the spring check')
  })
})

describe('view and caption', () => {
  it('lets the uploader, a keeper and an owner change them, with field messages for bad input', async () => {
    const byVet = await addPhoto({ who: 'vet' })
    for (const who of ['vet', 'keeper', 'owner'] as const) {
      const response = await client(who).patch(`/api/photos/${byVet.id}`, { view: 'right', caption: `seen by ${who}` })
      expect(response.status, who).toBe(200)
      expect(response.body).toMatchObject({ view: 'right', caption: `seen by ${who}` })
    }
    const byOwner = await addPhoto()
    expect((await client('vet').patch(`/api/photos/${byOwner.id}`, { caption: 'not mine' })).status).toBe(403)
    expect((await client('outsider').patch(`/api/photos/${byOwner.id}`, { caption: 'x' })).status).toBe(404)
    expect((await client('anonymous').patch(`/api/photos/${byOwner.id}`, { caption: 'x' })).status).toBe(401)
    const bad = await client('owner').patch(`/api/photos/${byOwner.id}`, { view: 'underneath', caption: 'x'.repeat(301) })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['caption', 'view'])
    expect((await client('owner').patch(`/api/photos/${byOwner.id}`, {})).status).toBe(400)
    expect((await client('owner').patch(`/api/photos/${randomUUID()}`, { caption: 'x' })).status).toBe(404)
  })
})

describe('profile picture', () => {
  it('may be chosen by an owner or a keeper, only among this fish\'s ready photos', async () => {
    const photo = await addPhoto()
    const path = `/api/fish/${world.fish.id}/profile-photo`
    for (const [who, status] of [['owner', 200], ['keeper', 200], ['vet', 403], ['outsider', 404], ['anonymous', 401]] as const) {
      expect((await client(who).post(path, { photoId: photo.id })).status, who).toBe(status)
    }
    expect((await client('owner').get(`/api/fish/${world.fish.id}`)).body.profilePhotoId).toBe(photo.id)
    const otherFish = await createFish(client('owner'), world.pond.id)
    const foreign = await addPhoto({ fishId: otherFish.id })
    const refused = await client('owner').post(path, { photoId: foreign.id })
    expect(refused.status).toBe(400)
    expect(refused.body.data.fieldErrors.photoId).toEqual(['This fish has no such photo'])
    expect((await client('owner').post(path, { photoId: 'nope' })).status).toBe(400)
  })

  it('keeps a focal point (where the head is) for cropping, reset when another picture is chosen', async () => {
    const fish = await createFish(client('owner'), world.pond.id)
    const portrait = await addPhoto({ fishId: fish.id, bytes: await makeJpeg({ width: 480, height: 640 }) })
    const path = `/api/fish/${fish.id}/profile-photo`
    const set = await client('keeper').post(path, { photoId: portrait.id, focus: { x: 50, y: 22 } })
    expect(set.status, JSON.stringify(set.body)).toBe(200)
    expect((await client('vet').get(`/api/fish/${fish.id}`)).body).toMatchObject({ profilePhotoId: portrait.id, profileFocus: { x: 50, y: 22 } })
    const card = (await client('vet').get(`/api/ponds/${world.pond.id}/fish`)).body.find((f: { id: string }) => f.id === fish.id)
    expect(card.profileFocus).toEqual({ x: 50, y: 22 })
    const outside = await client('owner').post(path, { photoId: portrait.id, focus: { x: 120, y: -3 } })
    expect(outside.status).toBe(400)
    expect(outside.body.data.fieldErrors).toMatchObject({ 'focus.x': ['At most 100 %'], 'focus.y': ['At least 0 %'] })
    expect((await client('vet').post(path, { photoId: portrait.id, focus: { x: 10, y: 10 } })).status).toBe(403)
    const other = await addPhoto({ fishId: fish.id })
    expect((await client('owner').post(path, { photoId: other.id })).status).toBe(200)
    expect((await client('owner').get(`/api/fish/${fish.id}`)).body.profileFocus).toBeNull()
  })
})

describe('removing and restoring', () => {
  it('lets the uploader or an owner remove; the photo waits 30 days in "recently removed"', async () => {
    const fish = await createFish(client('owner'), world.pond.id)
    const top = await addPhoto({ fishId: fish.id, who: 'keeper', view: 'top' })
    const side = await addPhoto({ fishId: fish.id, who: 'keeper', view: 'left' })
    expect((await client('owner').get(`/api/fish/${fish.id}`)).body.profilePhotoId).toBe(top.id)
    expect((await client('vet').post(`/api/photos/${top.id}/remove`)).status).toBe(403)
    expect((await client('outsider').post(`/api/photos/${top.id}/remove`)).status).toBe(404)
    const removed = await client('keeper').post(`/api/photos/${top.id}/remove`)
    expect(removed.status).toBe(200)
    expect(removed.body.removedAt).not.toBeNull()
    expect(Date.parse(removed.body.purgeAt) - Date.parse(removed.body.removedAt)).toBe(30 * 86_400_000)
    // The profile picture moves on to the newest photo left.
    expect((await client('owner').get(`/api/fish/${fish.id}`)).body.profilePhotoId).toBe(side.id)
    const ownerView = (await gallery('owner', fish.id)).body
    expect(ownerView.photos.map((p: { id: string }) => p.id)).toEqual([side.id])
    expect(ownerView.removed.map((p: { id: string }) => p.id)).toEqual([top.id])
    expect((await gallery('keeper', fish.id)).body.removed.map((p: { id: string }) => p.id)).toEqual([top.id])
    expect((await gallery('vet', fish.id)).body.removed).toEqual([])
    // Its images stay visible to those who may restore it, to nobody else.
    const image = (who: Who) => fetch(`${MAIN_URL}/api/photos/${top.id}/320.webp`, { headers: { cookie: client(who).cookieHeader() } })
    expect((await image('owner')).status).toBe(200)
    expect((await image('vet')).status).toBe(404)
    expect((await client('vet').post(`/api/photos/${top.id}/restore`)).status).toBe(403)
    const restored = await client('owner').post(`/api/photos/${top.id}/restore`)
    expect(restored.status).toBe(200)
    expect(restored.body.removedAt).toBeNull()
    expect((await gallery('vet', fish.id)).body.photos.map((p: { id: string }) => p.id).sort()).toEqual([top.id, side.id].sort())
  })

  it('refuses to restore a photo whose bytes were uploaded again meanwhile', async () => {
    const first = await addPhoto()
    await client('owner').post(`/api/photos/${first.id}/remove`)
    // Removed photos do not count as the same photo: the same bytes make a new one.
    const again = await addPhoto({ bytes: first.bytes })
    expect(again.duplicate).toBe('no')
    expect(again.id).not.toBe(first.id)
    const restore = await client('owner').post(`/api/photos/${first.id}/restore`)
    expect(restore.status).toBe(409)
    expect(restore.body.message).toMatch(/in the gallery already/)
  })

  it('cannot restore after 30 days', async () => {
    const photo = await addPhoto()
    await client('owner').post(`/api/photos/${photo.id}/remove`)
    await testDb().query('update photos set removed_at = now() - interval \'30 days 1 minute\' where id = $1', [photo.id])
    expect((await client('owner').post(`/api/photos/${photo.id}/restore`)).status).toBe(410)
  })
})

// A folder made unwritable on purpose; the bucket's counterpart (unreachable) is in object-storage.test.ts.
describe.skipIf(onS3)('a photo whose processing fails', () => {
  it('is recorded as failed with the reason, and a retry (pressed twice) makes it ready once', async () => {
    // A server with storage of its own, whose derived-images folder is a file: writing the copies fails.
    const storage = mkdtempSync(join(tmpdir(), 'fintrail-photos-failing-'))
    mkdirSync(join(storage, 'photos'), { recursive: true })
    writeFileSync(join(storage, 'photos', 'derived'), 'not a folder')
    const server = await startServer(MAIN_PORT + 5, { NUXT_STORAGE_DIR: storage })
    let photoId = ''
    try {
      const fish = await createFish(client('owner'), world.pond.id)
      const photo = await addPhoto({ fishId: fish.id, baseUrl: server.url })
      photoId = photo.id
      expect(photo.state).toBe('failed')
      const listed = (await gallery('keeper', fish.id)).body.photos[0]
      expect(listed).toMatchObject({ id: photo.id, state: 'failed' })
      expect(listed.failureReason).toMatch(/storage could not be written \(ENOTDIR\).*Retry/)
      // A failed photo is not anyone's profile picture yet.
      expect((await client('owner').get(`/api/fish/${fish.id}`)).body.profilePhotoId).toBeNull()

      rmSync(join(storage, 'photos', 'derived'))
      const retrier = new ApiClient(server.url)
      retrier.cookies = new Map(client('keeper').cookies)
      const [first, second] = await Promise.all([retrier.post(`/api/photos/${photo.id}/retry`), retrier.post(`/api/photos/${photo.id}/retry`)])
      // One ran; the other either found it running (202) or found it done (200).
      expect([first.status, second.status].sort()).toEqual(first.status === 202 || second.status === 202 ? [200, 202] : [200, 200])
      const third = await retrier.post(`/api/photos/${photo.id}/retry`)
      expect(third.status).toBe(200)
      expect(third.body).toMatchObject({ state: 'ready', failureReason: null, isProfile: true })
      const rows = await photoRows('fish_id = $1', [fish.id])
      expect(rows).toHaveLength(1)
      expect(existsSync(join(storage, 'photos', 'derived', photo.id))).toBe(true)
      expect(readdirSync(join(storage, 'photos', 'derived')).sort()).toEqual([photo.id])
      expect(readdirSync(join(storage, 'photos', 'derived', photo.id)).sort()).toEqual(ALL_DERIVED)
      expect((await client('outsider').post(`/api/photos/${photo.id}/retry`)).status).toBe(404)
    }
    finally {
      await server.stop()
      // Its files lived in the storage removed below: the row goes with them.
      if (photoId) {
        await testDb().query('update fish set profile_photo_id = null where profile_photo_id = $1', [photoId])
        await testDb().query('delete from photos where id = $1', [photoId])
      }
      rmSync(storage, { recursive: true, force: true })
    }
  })
})

describe('at start and every hour', () => {
  it('purges photos removed 30+ days ago, expired unfinished uploads and stray files; finishes interrupted work', async () => {
    const storage = testStorage()
    const fish = await createFish(client('owner'), world.pond.id)
    const old = await addPhoto({ fishId: fish.id })
    const recent = await addPhoto({ fishId: fish.id })
    for (const photo of [old, recent]) await client('owner').post(`/api/photos/${photo.id}/remove`)
    await testDb().query('update photos set removed_at = now() - interval \'31 days\' where id = $1', [old.id])
    await testDb().query('update photos set removed_at = now() - interval \'10 days\' where id = $1', [recent.id])
    const oldUploadId = old.url.split('/').pop()!

    // An unfinished upload, begun three days ago (past the 48-hour expiry).
    const unfinished = await createUpload(MAIN_URL, client('owner'), 5000, { fishId: fish.id, filename: 'never.jpg' })
    await tusRequest(MAIN_URL, client('owner'), 'PATCH', unfinished.location, { 'Tus-Resumable': TUS, 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream' }, Buffer.alloc(1000, 1))
    // A folder's uploads expire by the creation date in their info; a bucket's by the start of their multipart
    // upload, which S3 sets itself: there the expiry is left to @tus/s3-store and not checked here.
    if (!onS3) {
      const info = await readUploadInfo(unfinished.id)
      await storage.put(storage.uploadInfoKey(unfinished.id), JSON.stringify({ ...info, creation_date: new Date(Date.now() - 3 * 86_400_000).toISOString() }))
    }

    // A photo caught by a crash mid-processing: pending, its derived copies gone.
    const interrupted = await addPhoto({ fishId: fish.id })
    await testDb().query('update photos set state = \'pending\', variants = \'[]\' where id = $1', [interrupted.id])
    await storage.removePrefix(`photos/derived/${interrupted.id}/`)
    // An upload whose last byte arrived just before a crash, before its photo row was written.
    const arrived = await makeJpeg({ width: 500, height: 400 })
    const arrivedId = randomBytes(16).toString('hex')
    await storage.put(storage.uploadKey(arrivedId), arrived)
    await storage.put(storage.uploadInfoKey(arrivedId), JSON.stringify({ id: arrivedId, size: arrived.length, offset: 0, creation_date: new Date().toISOString(), metadata: { fishId: fish.id, filename: 'late.jpg', view: 'right', caption: '', uploaderId: world.owner.user.id } }))
    // Files no row accounts for.
    const strayId = randomUUID()
    await storage.put(`photos/originals/${strayId}`, 'left over')
    await storage.put(`photos/derived/${strayId}/320.webp`, 'left over')

    // A spreadsheet and an archive received by requests a stop cut off two hours ago, and one being read now.
    const received = join(testEnv().storageDir, 'tmp')
    mkdirSync(received, { recursive: true })
    const [leftSheet, leftArchive, current] = [`sheet-${randomUUID()}`, `import-${randomUUID()}.zip`, `sheet-${randomUUID()}`].map(name => join(received, name))
    for (const path of [leftSheet!, leftArchive!, current!]) writeFileSync(path, 'received')
    const twoHoursAgo = new Date(Date.now() - 2 * 3_600_000)
    for (const path of [leftSheet!, leftArchive!]) utimesSync(path, twoHoursAgo, twoHoursAgo)

    const server = await startServer(MAIN_PORT + 3)
    try {
      const deadline = Date.now() + (onS3 ? 60_000 : 20_000)
      for (;;) {
        const { rows } = await testDb().query('select (select count(*)::int from photos where id = $1) as old, (select count(*)::int from photos where upload_id = $2 and state = \'ready\') as arrived, (select state from photos where id = $3) as interrupted', [old.id, arrivedId, interrupted.id])
        if (rows[0].old === 0 && rows[0].arrived === 1 && rows[0].interrupted === 'ready' && !(await storedExists(`photos/originals/${strayId}`)) && !existsSync(leftArchive!)) break
        if (Date.now() > deadline) throw new Error(`maintenance did not finish: ${JSON.stringify(rows[0])}\n${server.output()}`)
        await new Promise(r => setTimeout(r, 200))
      }
    }
    finally {
      await server.stop()
    }
    expect(await filesOf(oldUploadId, old.id)).toEqual({ upload: [], original: [], derived: [], work: [] })
    expect(await photoRows('id = $1', [recent.id])).toHaveLength(1)
    expect((await filesOf(recent.url.split('/').pop()!, recent.id)).derived).toEqual(ALL_DERIVED)
    if (!onS3) expect((await filesOf(unfinished.id)).upload).toEqual([])
    expect((await filesOf(interrupted.url.split('/').pop()!, interrupted.id)).derived).toEqual(ALL_DERIVED)
    const [late] = await photoRows('upload_id = $1', [arrivedId])
    expect(late).toMatchObject({ state: 'ready', sha256: sha256(arrived), uploader_id: world.owner.user.id, fish_id: fish.id })
    expect(await storedNames(`photos/derived/${strayId}/`)).toEqual([])
    expect(await strayFiles()).toEqual([])
    expect([leftSheet, leftArchive, current].map(path => existsSync(path!))).toEqual([false, false, true])
    rmSync(current!)
  })
})
