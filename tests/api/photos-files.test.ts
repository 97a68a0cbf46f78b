import { cpSync, existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import exifr from 'exifr'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { MAIN_PORT, MAIN_URL, ROOT } from '../support/env'
import { createFish, pondWithRoles } from '../support/factories'
import { ALL_DERIVED, filesOf, makeHeicSample, makeHugePng, makeJpeg, makeOrientedJpeg, photoRows, startBuildCopy, strayFiles, tusUpload } from '../support/photos'

let world: Awaited<ReturnType<typeof pondWithRoles>>

beforeAll(async () => {
  world = await pondWithRoles()
})
afterAll(closeTestDb)

async function upload(bytes: Buffer, filename: string, fishId = world.fish.id, baseUrl = MAIN_URL) {
  const { done } = tusUpload(baseUrl, world.owner.client, bytes, { metadata: { fishId, filename, view: 'top' } })
  return done
}

/** The status and the server's own words from a refused tus request. */
async function refusal(bytes: Buffer, filename: string) {
  const error = await upload(bytes, filename).then(() => null, (e: { originalResponse?: { getStatus: () => number, getBody: () => string } }) => e)
  expect(error, `${filename} was accepted`).not.toBeNull()
  return { status: error!.originalResponse!.getStatus(), body: error!.originalResponse!.getBody() }
}

async function uploadedPhoto(bytes: Buffer, filename: string, fishId?: string) {
  const result = await upload(bytes, filename, fishId)
  expect(result.headers['photo-state']).toBe('ready')
  return result.headers['photo-id']!
}

async function served(photoId: string, variant: string, client: ApiClient = world.owner.client) {
  const response = await fetch(`${MAIN_URL}/api/photos/${photoId}/${variant}`, { headers: { cookie: client.cookieHeader() } })
  return { response, bytes: Buffer.from(await response.arrayBuffer()) }
}

/** RIFF chunk names of a WebP file: metadata would be in EXIF or "XMP " chunks. */
function webpChunks(bytes: Buffer) {
  const names: string[] = []
  for (let at = 12; at + 8 <= bytes.length;) {
    names.push(bytes.toString('ascii', at, at + 4))
    const size = bytes.readUInt32LE(at + 4)
    at += 8 + size + (size % 2)
  }
  return names
}

describe('files that are not usable photos', () => {
  const truncated = async () => {
    const whole = await makeJpeg({ width: 1600, height: 1200 })
    return whole.subarray(0, Math.floor(whole.length * 0.6))
  }
  const cases: [string, () => Buffer | Promise<Buffer>, string, number, RegExp][] = [
    ['a text file renamed .jpg', () => Buffer.from('Feeding schedule: twice a day in summer.\n'), 'notes.jpg', 415, /holds text, not a photo/],
    ['an HTML page renamed .jpg', () => Buffer.from('<!DOCTYPE html><html><head><title>x</title></head><body><script>alert(1)</script></body></html>'), 'page.jpg', 415, /web page \(HTML\)/],
    ['an SVG', () => Buffer.from('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>'), 'drawing.svg', 415, /SVG drawing/],
    ['a zero-byte file', () => Buffer.alloc(0), 'empty.jpg', 422, /empty \(0 bytes\)/],
    ['a truncated JPEG', truncated, 'cut.jpg', 422, /incomplete: it ends before the picture does/],
    ['an image of 30000 x 30000 pixels', () => makeHugePng(), 'bomb.png', 422, /30000 × 30000 pixels \(900 megapixels\)/],
    ['a HEIC file', () => makeHeicSample(), 'IMG_0001.HEIC', 415, /HEIC photos .* Most Compatible/],
  ]

  it.each(cases)('refuses %s with its own message, keeps nothing, and goes on serving', async (_label, make, filename, status, message) => {
    const bytes = await make()
    const fish = await createFish(world.owner.client, world.pond.id)
    const started = Date.now()
    const { done } = tusUpload(MAIN_URL, world.owner.client, bytes, { metadata: { fishId: fish.id, filename } })
    const error = await done.then(() => null, (e: { originalResponse?: { getStatus: () => number, getBody: () => string } }) => e)
    expect(error, 'accepted').not.toBeNull()
    expect(error!.originalResponse!.getStatus()).toBe(status)
    expect(error!.originalResponse!.getBody()).toMatch(message)
    // The pixel limit is read from the header: nothing of 2.7 GB is ever decoded.
    expect(Date.now() - started).toBeLessThan(5000)
    expect(await photoRows('fish_id = $1', [fish.id])).toEqual([])
    expect(await strayFiles()).toEqual([])
    expect((await fetch(`${MAIN_URL}/api/health`)).status).toBe(200)
  })

  it('names HEIC by its bytes even under a .jpg name, with 415 and not a server error', async () => {
    const { status, body } = await refusal(makeHeicSample(), 'looks-fine.jpg')
    expect(status).toBe(415)
    expect(body).toMatch(/HEIC/)
  })

  it('leaves no upload bytes behind for a refused file', async () => {
    const bytes = Buffer.from('plain text pretending to be a photo')
    let uploadUrl = ''
    const { upload, done } = tusUpload(MAIN_URL, world.owner.client, bytes, { metadata: { fishId: world.fish.id, filename: 'fake.jpg' } })
    await done.catch(() => (uploadUrl = upload.url ?? ''))
    expect(uploadUrl).toMatch(/\/api\/uploads\/[0-9a-f]{32}$/)
    expect((await filesOf(uploadUrl.split('/').pop()!)).upload).toEqual([])
  })
})

describe('derived images', () => {
  it('makes every size as specified, WebP and JPEG, from a 4000 x 3000 photo', async () => {
    const photoId = await uploadedPhoto(await makeJpeg({ width: 4000, height: 3000 }), 'large.jpg')
    const expected: Record<string, [number, number]> = { 320: [320, 240], 1024: [1024, 768], 2048: [2048, 1536] }
    for (const [size, [width, height]] of Object.entries(expected)) {
      for (const format of ['webp', 'jpg']) {
        const { response, bytes } = await served(photoId, `${size}.${format}`)
        expect(response.status).toBe(200)
        const metadata = await sharp(bytes).metadata()
        expect([metadata.format, metadata.width, metadata.height], `${size}.${format}`).toEqual([format === 'jpg' ? 'jpeg' : 'webp', width, height])
      }
    }
    const [row] = await photoRows('id = $1', [photoId])
    expect([row!.width, row!.height]).toEqual([4000, 3000])
    expect(row!.variants.map(v => `${v.longSide}.${v.format}`).sort()).toEqual(['1024.jpeg', '1024.webp', '2048.jpeg', '2048.webp', '320.jpeg', '320.webp'])
    expect((await filesOf(row!.upload_id, photoId)).derived).toEqual(ALL_DERIVED)
  })

  it('never enlarges a small photo', async () => {
    const photoId = await uploadedPhoto(await makeJpeg({ width: 600, height: 400 }), 'small.jpg')
    const { bytes } = await served(photoId, '2048.webp')
    const metadata = await sharp(bytes).metadata()
    expect([metadata.width, metadata.height]).toEqual([600, 400])
  })

  it('applies EXIF orientation 6: the photo comes out upright', async () => {
    const photoId = await uploadedPhoto(await makeOrientedJpeg(), 'sideways.jpg')
    for (const variant of ['1024.webp', '1024.jpg']) {
      const { bytes } = await served(photoId, variant)
      const { data, info } = await sharp(bytes).raw().toBuffer({ resolveWithObject: true })
      // Stored 1600 x 1200 with "rotate 90° clockwise": upright it is 768 x 1024, the red top band now on the right.
      expect([info.width, info.height]).toEqual([768, 1024])
      const pixel = (x: number, y: number) => [...data.subarray((y * info.width + x) * info.channels, (y * info.width + x) * info.channels + 3)]
      const [rightR, , rightB] = pixel(info.width - 20, 512)
      const [leftR, , leftB] = pixel(20, 512)
      expect(rightR).toBeGreaterThan(150)
      expect(rightB).toBeLessThan(100)
      expect(leftR).toBeLessThan(100)
      expect(leftB).toBeGreaterThan(150)
      // No orientation tag is left to rotate it a second time.
      expect((await sharp(bytes).metadata()).orientation).toBeUndefined()
    }
  })

  it('keeps no GPS position nor any other EXIF in what it serves, and reads the date the photo was taken', async () => {
    const source = await makeJpeg({ width: 2000, height: 1500, gps: true, takenAt: '2024:05:12 14:03:22' })
    // The fixture really carries what must not leak.
    const before = await exifr.parse(source, { gps: true })
    expect(before.latitude).toBeCloseTo(51.5, 5)
    expect(before.Make).toBe('Fintrail Test Camera')
    const photoId = await uploadedPhoto(source, 'garden.jpg')
    for (const size of [320, 1024, 2048]) {
      const jpeg = (await served(photoId, `${size}.jpg`)).bytes
      expect(await exifr.parse(jpeg, { gps: true, tiff: true, exif: true, xmp: true, icc: true, iptc: true }), `${size}.jpg`).toBeUndefined()
      expect(await exifr.gps(jpeg).catch(() => undefined)).toBeUndefined()
      const webp = (await served(photoId, `${size}.webp`)).bytes
      // exifr does not read WebP: its RIFF chunks show that no EXIF or XMP chunk was written.
      expect(webpChunks(webp).filter(name => name !== 'VP8 ' && name !== 'VP8L' && name !== 'VP8X'), `${size}.webp`).toEqual([])
      for (const bytes of [jpeg, webp]) {
        const metadata = await sharp(bytes).metadata()
        expect([metadata.exif, metadata.xmp, metadata.iptc, metadata.icc]).toEqual([undefined, undefined, undefined, undefined])
        expect(bytes.includes(Buffer.from('Fintrail Test Camera'))).toBe(false)
      }
    }
    const [row] = await photoRows('id = $1', [photoId])
    expect(row!.taken_at!.toISOString()).toBe('2024-05-12T14:03:22.000Z')
  })
})

describe('serving images', () => {
  it('serves only to members, with nosniff, ETag and private caching', async () => {
    const photoId = await uploadedPhoto(await makeJpeg(), 'served.jpg')
    const { response } = await served(photoId, '320.webp', world.vet.client)
    expect(response.status).toBe(200)
    expect(response.headers.get('content-type')).toBe('image/webp')
    expect(response.headers.get('x-content-type-options')).toBe('nosniff')
    expect(response.headers.get('cache-control')).toBe('private, max-age=86400')
    const etag = response.headers.get('etag')!
    expect(etag).toMatch(/^".+"$/)
    const again = await fetch(`${MAIN_URL}/api/photos/${photoId}/320.webp`, { headers: { 'cookie': world.vet.client.cookieHeader(), 'if-none-match': etag } })
    expect(again.status).toBe(304)
    expect((await served(photoId, '320.webp', world.outsider.client)).response.status).toBe(404)
    expect((await served(photoId, '320.webp', new ApiClient())).response.status).toBe(401)
    // Only derived copies exist to be served: the original has no route.
    for (const variant of ['original', 'original.jpg', '4000.jpg', '320.png', '..%2F..%2Foriginals']) {
      expect((await served(photoId, variant)).response.status, variant).toBe(404)
    }
    // No public folder holds photos: such a path is just an unknown page (sent to sign-in), never image bytes.
    const direct = await fetch(`${MAIN_URL}/storage/test-photos/photos/originals/${photoId}`, { redirect: 'manual', headers: { cookie: world.owner.client.cookieHeader() } })
    expect([302, 404]).toContain(direct.status)
    expect(direct.headers.get('content-type')).not.toMatch(/^image\//)
  })
})

describe('the built server on its own', () => {
  it('makes thumbnails from a copy of .output outside the checkout, with no node_modules around it', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fintrail-output-'))
    try {
      cpSync(resolve(ROOT, '.output'), join(dir, '.output'), { recursive: true })
      // Node looks for packages in every parent folder: none of them may hold a node_modules.
      for (let parent = dir; parent !== dirname(parent); parent = dirname(parent)) expect(existsSync(join(parent, 'node_modules')), parent).toBe(false)
      const server = await startBuildCopy(join(dir, '.output'), MAIN_PORT + 4)
      try {
        const fish = await createFish(world.owner.client, world.pond.id)
        const result = await upload(await makeJpeg({ width: 3000, height: 2000 }), 'copied.jpg', fish.id, server.url)
        expect(result.headers['photo-state']).toBe('ready')
        const { bytes } = await served(result.headers['photo-id']!, '320.webp')
        expect((await sharp(bytes).metadata()).width).toBe(320)
        expect(server.output()).not.toMatch(/Could not load the "sharp" module/)
      }
      finally {
        await server.stop()
      }
    }
    finally {
      rmSync(dir, { recursive: true, force: true })
    }
  })
})
