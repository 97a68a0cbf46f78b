import { request } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb } from '../support/db'
import { MAIN_PORT, MAIN_URL } from '../support/env'
import { createFish, pondWithRoles } from '../support/factories'
import { ALL_DERIVED, TUS, createUpload, filesOf, finishedUploadNames, makeTwentyMegabyteJpeg, photoRows, sha256, storedSha256, strayFiles, tusRequest, tusUpload } from '../support/photos'
import { onS3, storedUploadBytes } from '../support/stored-files'
import { startServer, type RunningServer } from '../support/server'

// A pond side has a weak signal: an upload must survive a dropped connection, a server restart
// and a server killed outright, and still store exactly the bytes that were sent.
let world: Awaited<ReturnType<typeof pondWithRoles>>
let photo: Buffer
const extraServers: RunningServer[] = []
const RESTART_PORT = MAIN_PORT + 1

beforeAll(async () => {
  world = await pondWithRoles()
  photo = await makeTwentyMegabyteJpeg()
}, 60_000)

afterAll(async () => {
  for (const server of extraServers) await server.stop()
  await closeTestDb()
})

async function extraServer() {
  const server = await startServer(RESTART_PORT)
  extraServers.push(server)
  return server
}

// Each test has a fish of its own: the same bytes twice on one fish are one photo (deduplicated).
async function newFish() {
  return (await createFish(world.owner.client, world.pond.id)).id
}
const metadata = (fishId: string, filename: string) => ({ fishId, filename, view: 'top' })

/** Starts an upload and stops it (abort or `stop`) once more than 7.5 MB, inside the second chunk, went out. */
async function uploadUntilCut(baseUrl: string, fishId: string, filename: string, cut: (upload: { abort: () => Promise<void> }) => Promise<void> | void) {
  let url = ''
  let cutDone!: () => void
  const wasCut = new Promise<void>(resolve => (cutDone = resolve))
  let cutting = false
  const { done } = tusUpload(baseUrl, world.owner.client, photo, {
    metadata: metadata(fishId, filename),
    onProgress: async (sent, upload) => {
      if (cutting || sent < 7.5 * 1024 * 1024) return
      cutting = true
      url = upload.url!
      await cut(upload)
      cutDone()
    },
  })
  // After an abort the client neither succeeds nor fails: it just stops.
  const outcome = await Promise.race([wasCut.then(() => 'cut' as const), done.then(() => 'finished' as const, () => 'failed' as const)])
  if (outcome !== 'cut') await wasCut
  return url
}

async function serverOffset(baseUrl: string, url: string) {
  const head = await tusRequest(baseUrl, world.owner.client, 'HEAD', new URL(url, baseUrl).pathname, { 'Tus-Resumable': TUS })
  expect(head.status).toBe(200)
  return Number(head.headers.get('upload-offset'))
}

async function resumeAndCheck(baseUrl: string, url: string, keptAtLeast = 5 * 1024 * 1024) {
  const offset = await serverOffset(baseUrl, url)
  // Cut mid-way: what the server stored is kept, and it is not everything.
  expect(offset).toBeGreaterThanOrEqual(keptAtLeast)
  expect(offset).toBeLessThan(photo.length)
  const patchOffsets: number[] = []
  const result = await tusUpload(baseUrl, world.owner.client, photo, { uploadUrl: url, onPatch: o => patchOffsets.push(o) }).done
  // tus-js-client asks with HEAD and continues exactly where the server says it stands.
  expect(patchOffsets[0]).toBe(offset)
  expect(result.headers['photo-state']).toBe('ready')
  const uploadId = url.split('/').pop()!
  const rows = await photoRows('upload_id = $1', [uploadId])
  expect(rows).toHaveLength(1)
  expect(rows[0]!.sha256).toBe(sha256(photo))
  expect(rows[0]!.state).toBe('ready')
  expect(result.headers['photo-id']).toBe(rows[0]!.id)
  expect(await storedSha256(`photos/originals/${rows[0]!.id}`)).toBe(sha256(photo))
  return { uploadId, photoId: rows[0]!.id }
}

describe('resumable upload of a 20 MB photo in 5 MB chunks', () => {
  it('resumes after the connection is dropped, and stores the very bytes that were sent', async () => {
    expect(photo.length).toBeGreaterThan(19_000_000)
    const url = await uploadUntilCut(MAIN_URL, await newFish(), 'dropped.jpg', upload => upload.abort())
    const { uploadId, photoId } = await resumeAndCheck(MAIN_URL, url)
    expect((await filesOf(uploadId, photoId)).derived).toEqual(ALL_DERIVED)
  })

  it('resumes after the server process is restarted between the abort and the resume', async () => {
    const first = await extraServer()
    const url = await uploadUntilCut(first.url, await newFish(), 'restarted.jpg', upload => upload.abort())
    await first.stop()
    const second = await extraServer()
    const { uploadId, photoId } = await resumeAndCheck(second.url, url)
    expect((await filesOf(uploadId, photoId)).derived).toEqual(ALL_DERIVED)
    await second.stop()
  })

  it('survives the server killed with SIGKILL in the middle of a PATCH: one photo, the right hash, no orphan files', async () => {
    const fishId = await newFish()
    const first = await extraServer()
    const { location, id: uploadId } = await createUpload(first.url, world.owner.client, photo.length, metadata(fishId, 'killed.jpg'))
    // The whole photo in one slow PATCH; the server dies while it is writing.
    const patch = slowPatch(first.url, location, 0, photo)
    // In a bucket the first part (8 MB) must be stored: what arrived after it lives in the dead process.
    await waitFor(async () => (await storedUploadBytes(uploadId)) > 1024 * 1024, onS3 ? 40_000 : 15_000)
    await first.kill()
    expect(first.process.signalCode).toBe('SIGKILL')
    expect(await patch).toHaveProperty('error')
    const keptOnDisk = await storedUploadBytes(uploadId)
    expect(keptOnDisk).toBeLessThan(photo.length / 2)
    const second = await extraServer()
    expect(await serverOffset(second.url, location)).toBe(keptOnDisk)
    const { photoId } = await resumeAndCheck(second.url, new URL(location, second.url).href, 1024 * 1024)
    const files = await filesOf(uploadId, photoId)
    // The finished upload stays (its bytes are the original's second name) so a client that lost the
    // last answer sees "complete" instead of sending 20 MB again.
    expect(files.upload).toEqual(finishedUploadNames(uploadId))
    expect(files.original).toEqual([photoId])
    expect(files.derived).toEqual(ALL_DERIVED)
    expect(files.work).toEqual([])
    expect(await photoRows('fish_id = $1', [fishId])).toHaveLength(1)
    expect(await strayFiles()).toEqual([])
    await second.stop()
  })
})

async function waitFor(condition: () => boolean | Promise<boolean>, timeoutMs = 15_000) {
  const deadline = Date.now() + timeoutMs
  while (!(await condition())) {
    if (Date.now() > deadline) throw new Error('condition not met in time')
    await new Promise(r => setTimeout(r, 20))
  }
}

/** A PATCH whose body is sent slowly, 256 kB every 100 ms, so another request can arrive meanwhile. */
function slowPatch(baseUrl: string, path: string, offset: number, body: Buffer) {
  return new Promise<{ status: number, offset: number } | { error: string }>((resolve) => {
    const req = request(`${baseUrl}${path}`, {
      method: 'PATCH',
      headers: {
        'cookie': world.owner.client.cookieHeader(),
        'Tus-Resumable': TUS,
        'Upload-Offset': String(offset),
        'Content-Type': 'application/offset+octet-stream',
        'Content-Length': String(body.length),
      },
    })
    req.on('response', (res) => {
      res.resume()
      resolve({ status: res.statusCode!, offset: Number(res.headers['upload-offset']) })
    })
    req.on('error', error => resolve({ error: error.message }))
    let sent = 0
    const step = 256 * 1024
    const timer = setInterval(() => {
      if (req.destroyed || sent >= body.length) {
        clearInterval(timer)
        if (!req.destroyed) req.end()
        return
      }
      req.write(body.subarray(sent, sent + step))
      sent += step
    }, 100)
  })
}

describe('two PATCHes racing on one upload', () => {
  it('refuses the second with 409 and still ends with the exact bytes', async () => {
    const { location, id } = await createUpload(MAIN_URL, world.owner.client, photo.length, metadata(await newFish(), 'raced.jpg'))
    const first = slowPatch(MAIN_URL, location, 0, photo)
    await new Promise(r => setTimeout(r, 600))
    // Same offset, sent while the first still holds the upload: by the time it gets its turn the offset has moved on.
    const second = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { 'Tus-Resumable': TUS, 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream' }, photo)
    expect(second.status).toBe(409)
    const firstOutcome = await first
    // The first was asked to let go (tus lock drain): it stops early with what it stored so far.
    if ('status' in firstOutcome) expect(firstOutcome.status).toBe(204)
    const offset = Number((await tusRequest(MAIN_URL, world.owner.client, 'HEAD', location, { 'Tus-Resumable': TUS })).headers.get('upload-offset'))
    expect(offset).toBeGreaterThan(0)
    expect(offset).toBeLessThan(photo.length)
    const rest = await tusRequest(MAIN_URL, world.owner.client, 'PATCH', location, { 'Tus-Resumable': TUS, 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream' }, photo.subarray(offset))
    expect(rest.status).toBe(204)
    expect(rest.headers.get('photo-state')).toBe('ready')
    const rows = await photoRows('upload_id = $1', [id])
    expect(rows).toHaveLength(1)
    expect(rows[0]!.sha256).toBe(sha256(photo))
    expect(await storedSha256(`photos/originals/${rows[0]!.id}`)).toBe(sha256(photo))
  })
})
