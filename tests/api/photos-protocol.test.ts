import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { testDb, closeTestDb } from '../support/db'
import { MAIN_URL } from '../support/env'
import { createFish, createPond, pondWithRoles, signedInUser } from '../support/factories'
import { TUS, createUpload, encodeMetadata, makeJpeg, tusRequest } from '../support/photos'
import { storedNames, storedUploadNames, testStorage } from '../support/stored-files'
import type { ApiClient } from '../support/client'

// Spec: tus resumable upload protocol 1.0.0, https://tus.io/protocols/resumable-upload
// (sections "Core Protocol" and "Protocol Extensions > Creation").
let world: Awaited<ReturnType<typeof pondWithRoles>>
let jpeg: Buffer

beforeAll(async () => {
  world = await pondWithRoles()
  jpeg = await makeJpeg({ width: 800, height: 600 })
})
afterAll(closeTestDb)

const octets = { 'Tus-Resumable': TUS, 'Content-Type': 'application/offset+octet-stream' }
const metadataFor = (fishId: string) => ({ fishId, filename: 'side.jpg', view: 'left' })
const uploadsOnDisk = async () => (await storedNames(testStorage().uploadsPrefix)).filter(name => /^[0-9a-f]{32}/.test(name)).length

async function newUpload(client: ApiClient = world.owner.client, length = jpeg.length) {
  return createUpload(MAIN_URL, client, length, metadataFor(world.fish.id))
}

describe('tus 1.0.0 protocol answers', () => {
  it('HEAD reports the offset, the length and no-store (Core Protocol, HEAD)', async () => {
    const { location } = await newUpload()
    const patch = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 1000))
    expect(patch.status).toBe(204)
    const head = await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location, { 'Tus-Resumable': TUS })
    // "The Server MUST always include the Upload-Offset header in the response for a HEAD request"
    expect(head.status).toBe(200)
    expect(head.headers.get('upload-offset')).toBe('1000')
    expect(head.headers.get('upload-length')).toBe(String(jpeg.length))
    // "The Server MUST prevent the client and/or proxies from caching the response by adding the Cache-Control: no-store header"
    expect(head.headers.get('cache-control')).toBe('no-store')
  })

  it('a PATCH at the wrong Upload-Offset gets 409 and changes nothing (Core Protocol, PATCH)', async () => {
    const { location } = await newUpload()
    await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 2000))
    // "If the offsets do not match, the Server MUST respond with the 409 Conflict status without modifying the upload resource."
    for (const wrong of ['0', '1999', '2001']) {
      const conflict = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { ...octets, 'Upload-Offset': wrong }, jpeg.subarray(Number(wrong), Number(wrong) + 500))
      expect(conflict.status, `offset ${wrong}`).toBe(409)
    }
    const head = await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location, { 'Tus-Resumable': TUS })
    expect(head.headers.get('upload-offset')).toBe('2000')
  })

  it('a request without Tus-Resumable gets 412 (Core Protocol, Tus-Resumable header)', async () => {
    // "The Tus-Resumable header MUST be included in every request and response except for OPTIONS requests";
    // @tus/server answers its absence as it answers an unsupported version: 412 Precondition Failed.
    const { location } = await newUpload()
    const before = await uploadsOnDisk()
    const post = await tusRequest(MAIN_URL, world.owner.client, 'POST', '/api/uploads', { 'Upload-Length': '100', 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(post.status).toBe(412)
    expect(await uploadsOnDisk()).toBe(before)
    expect((await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location)).status).toBe(412)
    expect((await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { 'Content-Type': 'application/offset+octet-stream', 'Upload-Offset': '0' }, jpeg.subarray(0, 10))).status).toBe(412)
    // "If the Client requests a version which the Server does not support, the Server MUST respond with
    // the 412 Precondition Failed status and MUST include the Tus-Version header into the response."
    const unsupported = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { ...octets, 'Tus-Resumable': '0.2.2', 'Upload-Offset': '0' }, jpeg.subarray(0, 10))
    expect(unsupported.status).toBe(412)
    expect(unsupported.headers.get('tus-version')).toBe('1.0.0')
    expect((await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location, { 'Tus-Resumable': TUS })).headers.get('upload-offset')).toBe('0')
  })

  it('an upload over the maximum size gets 413, announced in Tus-Max-Size (Creation extension)', async () => {
    const options = await tusRequest(MAIN_URL, null, 'OPTIONS', '/api/uploads')
    expect(options.status).toBe(204)
    expect(options.headers.get('tus-max-size')).toBe(String(40 * 1024 * 1024))
    const before = await uploadsOnDisk()
    // "If the length of the upload exceeds the maximum, ... the Server MUST respond with the 413 Request Entity Too Large status."
    const tooLarge = await tusRequest(MAIN_URL, world.owner.client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': String(40 * 1024 * 1024 + 1), 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(tooLarge.status).toBe(413)
    expect(await uploadsOnDisk()).toBe(before)
    // Bytes beyond the declared length are refused the same way.
    const { location } = await newUpload(world.owner.client, 100)
    const overflow = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, Buffer.alloc(101))
    expect(overflow.status).toBe(413)
  })

  it('refuses an upload of unknown length and metadata that names no fish, writing nothing', async () => {
    const before = await uploadsOnDisk()
    const deferred = await tusRequest(MAIN_URL, world.owner.client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Defer-Length': '1', 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(deferred.status).toBe(400)
    expect(deferred.text).toMatch(/Upload-Length/)
    const noFish = await tusRequest(MAIN_URL, world.owner.client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': '100', 'Upload-Metadata': encodeMetadata({ filename: 'a.jpg' }) })
    expect(noFish.status).toBe(400)
    expect(noFish.text).toMatch(/fishId: Name the fish/)
    const badView = await tusRequest(MAIN_URL, world.owner.client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': '100', 'Upload-Metadata': encodeMetadata({ ...metadataFor(world.fish.id), view: 'underneath' }) })
    expect(badView.status).toBe(400)
    expect(badView.text).toMatch(/view:/)
    expect(await uploadsOnDisk()).toBe(before)
  })

  it('rejects ids that try to leave the upload folder', async () => {
    for (const path of ['/api/uploads/..%2F..%2Fpackage.json', '/api/uploads/%2e%2e', '/api/uploads/..%5C..%5Cpackage.json', '/api/uploads/test-env-photos']) {
      const head = await tusRequest(MAIN_URL, world.owner.client, 'HEAD', path, { 'Tus-Resumable': TUS })
      expect(head.status, path).toBe(404)
    }
  })

  it('answers CORS for our own origin only, never "*"', async () => {
    const foreign = await tusRequest(MAIN_URL, null, 'OPTIONS', '/api/uploads', { 'Origin': 'https://elsewhere.example', 'Access-Control-Request-Method': 'POST' })
    expect(foreign.headers.get('access-control-allow-origin')).not.toBe('*')
    expect(foreign.headers.get('access-control-allow-origin')).toBeNull()
    const own = await tusRequest(MAIN_URL, null, 'OPTIONS', '/api/uploads', { 'Origin': MAIN_URL, 'Access-Control-Request-Method': 'POST' })
    expect(own.headers.get('access-control-allow-origin')).toBe(MAIN_URL)
    // A cross-site creation is stopped before tus sees it.
    const cross = await tusRequest(MAIN_URL, world.owner.client, 'POST', '/api/uploads', { 'Origin': 'https://elsewhere.example', 'Tus-Resumable': TUS, 'Upload-Length': '100', 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(cross.status).toBe(403)
  })
})

describe('who may create, resume and read uploads', () => {
  it('a signed-out client can do nothing: 401 for every tus method, nothing written', async () => {
    const { location } = await newUpload()
    const before = await uploadsOnDisk()
    const create = await tusRequest(MAIN_URL, null, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': '100', 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(create.status).toBe(401)
    expect(await uploadsOnDisk()).toBe(before)
    expect((await tusRequest(MAIN_URL, null, 'HEAD', location, { 'Tus-Resumable': TUS })).status).toBe(401)
    expect((await tusRequest(MAIN_URL, null, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 100))).status).toBe(401)
    expect((await tusRequest(MAIN_URL, null, 'DELETE', location, { 'Tus-Resumable': TUS })).status).toBe(401)
    expect((await tusRequest(MAIN_URL, null, 'GET', location)).status).toBe(401)
    const head = await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location, { 'Tus-Resumable': TUS })
    expect(head.headers.get('upload-offset')).toBe('0')
  })

  it('a non-member gets 404 for the creation and for someone else\'s upload, and nothing is written', async () => {
    const { location } = await newUpload()
    const before = await uploadsOnDisk()
    const outsider = world.outsider.client
    const create = await tusRequest(MAIN_URL, outsider, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': '100', 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(create.status).toBe(404)
    expect(await uploadsOnDisk()).toBe(before)
    expect((await tusRequest(MAIN_URL, outsider, 'HEAD', location, { 'Tus-Resumable': TUS })).status).toBe(404)
    expect((await tusRequest(MAIN_URL, outsider, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 100))).status).toBe(404)
    expect((await tusRequest(MAIN_URL, outsider, 'DELETE', location, { 'Tus-Resumable': TUS })).status).toBe(404)
    expect((await tusRequest(MAIN_URL, outsider, 'GET', location)).status).toBe(404)
    const head = await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location, { 'Tus-Resumable': TUS })
    expect(head.headers.get('upload-offset')).toBe('0')
  })

  it('a keeper of another pond cannot attach a photo to this pond\'s fish by naming it in the metadata', async () => {
    const other = await signedInUser({ name: 'Other keeper' })
    const theirPond = await createPond(other.client)
    await createFish(other.client, theirPond.id)
    const before = await uploadsOnDisk()
    const attempt = await tusRequest(MAIN_URL, other.client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': String(jpeg.length), 'Upload-Metadata': encodeMetadata(metadataFor(world.fish.id)) })
    expect(attempt.status).toBe(404)
    expect(await uploadsOnDisk()).toBe(before)
    // Claiming someone else as the uploader does not work either: the server writes who is asking.
    const { location } = await createUpload(MAIN_URL, world.keeper.client, jpeg.length, { ...metadataFor(world.fish.id), uploaderId: world.owner.user.id })
    const head = await tusRequest(MAIN_URL, world.keeper.client, 'HEAD', location, { 'Tus-Resumable': TUS })
    const stored = Object.fromEntries(head.headers.get('upload-metadata')!.split(',').map(pair => pair.split(' ')).map(([k, v]) => [k, Buffer.from(v ?? '', 'base64').toString()]))
    expect(stored.uploaderId).toBe(world.keeper.user.id)
  })

  it('another member of the pond cannot resume someone else\'s upload, and nobody can download one', async () => {
    const { location } = await newUpload()
    expect((await tusRequest(MAIN_URL, world.keeper.client, 'HEAD', location, { 'Tus-Resumable': TUS })).status).toBe(404)
    expect((await tusRequest(MAIN_URL, world.vet.client, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 100))).status).toBe(404)
    // tus's own GET would hand out the raw bytes, GPS included: even the uploader is refused.
    const whole = await newUpload()
    const done = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', whole.location, { ...octets, 'Upload-Offset': '0' }, jpeg)
    expect(done.status).toBe(204)
    const download = await tusRequest(MAIN_URL, world.owner.client, 'GET', whole.location)
    expect(download.status).toBe(405)
    expect(download.text).not.toContain('JFIF')
    // A finished upload is a photo: tus termination cannot delete it behind the gallery's back.
    expect((await tusRequest(MAIN_URL, world.owner.client, 'DELETE', whole.location, { 'Tus-Resumable': TUS })).status).toBe(400)
  })

  it('a member removed from the pond mid-upload cannot continue it', async () => {
    const w = await pondWithRoles()
    const { location } = await createUpload(MAIN_URL, w.keeper.client, jpeg.length, metadataFor(w.fish.id))
    expect((await tusRequest(MAIN_URL, w.keeper.client, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 1000))).status).toBe(204)
    await testDb().query('delete from memberships where pond_id = $1 and user_id = $2', [w.pond.id, w.keeper.user.id])
    expect((await tusRequest(MAIN_URL, w.keeper.client, 'PATCH', location, { ...octets, 'Upload-Offset': '1000' }, jpeg.subarray(1000))).status).toBe(404)
    const { rows } = await testDb().query('select count(*)::int as n from photos where fish_id = $1', [w.fish.id])
    expect(rows[0].n).toBe(0)
  })

  it('the uploader may give up an unfinished upload (termination), which removes its bytes', async () => {
    const { location, id } = await newUpload()
    await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { ...octets, 'Upload-Offset': '0' }, jpeg.subarray(0, 500))
    // Its bytes so far and its info (in a bucket: the info and the piece smaller than a part).
    expect(await storedUploadNames(id)).toHaveLength(2)
    expect((await tusRequest(MAIN_URL, world.owner.client, 'DELETE', location, { 'Tus-Resumable': TUS })).status).toBe(204)
    expect(await storedUploadNames(id)).toHaveLength(0)
  })
})
