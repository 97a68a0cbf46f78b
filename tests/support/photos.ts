import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { deflateSync, crc32 } from 'node:zlib'
import sharp from 'sharp'
import * as tus from 'tus-js-client'
import type { ApiClient } from './client'
import { testDb } from './db'
import { testEnv } from './env'
import { onS3, storedNames, storedUploadNames, testStorage, uploadInfoName } from './stored-files'

export const TUS = '1.0.0'

export function sha256(bytes: Buffer) {
  return createHash('sha256').update(bytes).digest('hex')
}

/** A JPEG of coloured noise, optionally with an EXIF orientation, a GPS position and a capture date. */
export async function makeJpeg(options: { width?: number, height?: number, orientation?: number, gps?: boolean, takenAt?: string, quality?: number, sigma?: number } = {}) {
  const { width = 1200, height = 900, quality = 85, sigma = 40 } = options
  let image = sharp({ create: { width, height, channels: 3, background: '#3a6f8a', noise: { type: 'gaussian', mean: 128, sigma } } })
    .jpeg({ quality, chromaSubsampling: quality >= 100 ? '4:4:4' : '4:2:0' })
  const exif: Record<string, Record<string, string>> = { IFD0: { Make: 'Fintrail Test Camera', Model: 'Pondside 1', Software: 'fixture' } }
  if (options.takenAt) exif.IFD2 = { DateTimeOriginal: options.takenAt }
  // 51°30'0"N 0°7'30"W, in EXIF's degree/minute/second rationals.
  if (options.gps) exif.IFD3 = { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 30/1' }
  image = image.withExif(exif)
  if (options.orientation) image = image.withMetadata({ orientation: options.orientation })
  return image.toBuffer()
}

/**
 * A photo whose top third is red and the rest blue: after applying EXIF orientation 6 (rotate 90°
 * clockwise) the red band must be on the right-hand side.
 */
export async function makeOrientedJpeg() {
  const width = 1600
  const height = 1200
  const pixels = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = (y * width + x) * 3
      if (y < height / 3) pixels.set([220, 30, 30], i)
      else pixels.set([30, 60, 200], i)
    }
  }
  return sharp(pixels, { raw: { width, height, channels: 3 } }).jpeg({ quality: 90 })
    .withExif({ IFD0: { Make: 'Fintrail Test Camera' } }).withMetadata({ orientation: 6 }).toBuffer()
}

/** About 20 MB of incompressible JPEG (noise at quality 100), 3040 × 2300 pixels. */
export async function makeTwentyMegabyteJpeg() {
  const bytes = await makeJpeg({ width: 3040, height: 2300, quality: 100, sigma: 80 })
  if (bytes.length < 19_000_000) throw new Error(`fixture is only ${bytes.length} bytes`)
  return bytes
}

function pngChunk(type: string, data: Buffer) {
  const length = Buffer.alloc(4)
  length.writeUInt32BE(data.length)
  const body = Buffer.concat([Buffer.from(type, 'ascii'), data])
  const crc = Buffer.alloc(4)
  crc.writeUInt32BE(crc32(body) >>> 0)
  return Buffer.concat([length, body, crc])
}

/**
 * A valid PNG header for a huge picture with a few rows of data: under 1 kB on disk, 30000 × 30000
 * pixels (900 megapixels, 2.7 GB decoded) to anyone who believes the header.
 */
export function makeHugePng(width = 30000, height = 30000) {
  const header = Buffer.alloc(13)
  header.writeUInt32BE(width, 0)
  header.writeUInt32BE(height, 4)
  header[8] = 8 // bit depth
  header[9] = 2 // colour type RGB
  const rows = deflateSync(Buffer.alloc((width * 3 + 1) * 4))
  return Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), pngChunk('IHDR', header), pngChunk('IDAT', rows), pngChunk('IEND', Buffer.alloc(0))])
}

/**
 * The start of a HEIC file as iPhones write it: an ISO-BMFF "ftyp" box with major brand "heic".
 * file-type recognises HEIC by exactly this box; the rest is padding, as no HEIC encoder is at hand.
 */
export function makeHeicSample() {
  const ftyp = Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from('ftypheic'), Buffer.from([0, 0, 0, 0]), Buffer.from('mif1heic')])
  return Buffer.concat([ftyp, Buffer.from([0, 0, 0, 16]), Buffer.from('meta'), Buffer.alloc(8), Buffer.alloc(4000, 7)])
}

export interface TusOptions {
  metadata?: Record<string, string>
  chunkSize?: number
  uploadUrl?: string
  headers?: Record<string, string>
  /** Called with the bytes sent so far; may stop the upload. */
  onProgress?: (sent: number, upload: tus.Upload) => void
  onPatch?: (offset: number) => void
}

/** tus-js-client, as a browser would use it, with the client's session cookie; resolves with the last response. */
export function tusUpload(baseUrl: string, client: ApiClient, bytes: Buffer, options: TusOptions = {}) {
  let upload!: tus.Upload
  const done = new Promise<{ url: string, status: number, headers: Record<string, string> }>((resolve, reject) => {
    upload = new tus.Upload(bytes, {
      endpoint: `${baseUrl}/api/uploads`,
      uploadUrl: options.uploadUrl ?? null,
      chunkSize: options.chunkSize ?? 5 * 1024 * 1024,
      metadata: options.metadata ?? {},
      headers: { cookie: client.cookieHeader(), ...options.headers },
      retryDelays: [],
      storeFingerprintForResuming: false,
      onBeforeRequest: (request) => {
        if (request.getMethod() === 'PATCH') options.onPatch?.(Number(request.getHeader('Upload-Offset')))
      },
      onProgress: sent => options.onProgress?.(sent, upload),
      onSuccess: ({ lastResponse }) => {
        const headers: Record<string, string> = {}
        for (const name of ['photo-id', 'photo-state', 'photo-duplicate', 'upload-offset']) headers[name] = lastResponse.getHeader(name) ?? ''
        resolve({ url: upload.url!, status: lastResponse.getStatus(), headers })
      },
      onError: reject,
    })
    upload.start()
  })
  return { upload, done }
}

/** A raw tus request with the client's cookie, for checks a well-behaved client never makes. */
export async function tusRequest(baseUrl: string, client: ApiClient | null, method: string, path: string, headers: Record<string, string> = {}, body?: Buffer) {
  const response = await fetch(baseUrl + path, {
    method,
    headers: { ...(client?.cookies.size ? { cookie: client.cookieHeader() } : {}), ...headers },
    body,
  })
  return { status: response.status, headers: response.headers, text: await response.text() }
}

export function encodeMetadata(metadata: Record<string, string>) {
  return Object.entries(metadata).map(([key, value]) => `${key} ${Buffer.from(value).toString('base64')}`).join(',')
}

/** Creates an upload with the raw protocol and returns its id. */
export async function createUpload(baseUrl: string, client: ApiClient, length: number, metadata: Record<string, string>) {
  const response = await tusRequest(baseUrl, client, 'POST', '/api/uploads', { 'Tus-Resumable': TUS, 'Upload-Length': String(length), 'Upload-Metadata': encodeMetadata(metadata) })
  if (response.status !== 201) throw new Error(`create answered ${response.status}: ${response.text}`)
  const location = response.headers.get('location')!
  return { id: location.split('/').pop()!, location }
}

export function storageDirs() {
  const root = testEnv().storageDir
  return { uploads: join(root, 'uploads'), originals: join(root, 'photos', 'originals'), derived: join(root, 'photos', 'derived') }
}

/** Everything stored for one upload id and its photo (if any), in the folder or the bucket under test. */
export async function filesOf(uploadId: string, photoId?: string) {
  return {
    upload: await storedUploadNames(uploadId),
    original: photoId ? (await storedNames('photos/originals/')).filter(name => name.startsWith(photoId)) : [],
    derived: photoId ? await storedNames(`photos/derived/${photoId}/`) : [],
    work: photoId ? (await storedNames('photos/derived/')).filter(name => name.startsWith(`${photoId}.`)) : [],
  }
}

export const ALL_DERIVED = ['1024.jpg', '1024.webp', '2048.jpg', '2048.webp', '320.jpg', '320.webp']

/** What the finished upload `id` leaves stored: its bytes and its info. */
export const finishedUploadNames = (uploadId: string) => [uploadId, uploadInfoName(uploadId)].sort()

/**
 * Files under storage that no photo row and no live upload accounts for. Every photo's original and
 * derived folder must have a row; every upload's bytes must have their info and (in a folder) the reverse;
 * in a bucket the info of an upload in progress stands alone until its last part arrives.
 */
export async function strayFiles() {
  const { rows } = await testDb().query<{ id: string }>('select id from photos')
  const photoIds = new Set(rows.map(r => r.id))
  const stray: string[] = []
  for (const name of await storedNames('photos/originals/')) if (!photoIds.has(name)) stray.push(`originals/${name}`)
  for (const name of await storedNames('photos/derived/')) if (!photoIds.has(name)) stray.push(`derived/${name}`)
  const uploads = new Set((await storedNames(testStorage().uploadsPrefix)).filter(name => /^[0-9a-f]{32}/.test(name)))
  const infoSuffix = uploadInfoName('x').slice(1)
  for (const name of uploads) {
    const isInfo = name.endsWith(infoSuffix)
    if (isInfo && onS3) continue
    const partner = isInfo ? name.slice(0, -infoSuffix.length) : `${name.replace(/\.part$/, '')}${infoSuffix}`
    if (!uploads.has(partner)) stray.push(`uploads/${name}`)
  }
  return stray
}

export function fileSha256(path: string) {
  return sha256(readFileSync(path))
}

/** The sha256 of a stored object (`photos/originals/<id>`). */
export async function storedSha256(key: string) {
  return sha256(await testStorage().readBuffer(key))
}

export async function photoRows(where: string, params: unknown[]) {
  const { rows } = await testDb().query(`select * from photos where ${where}`, params)
  return rows as { id: string, upload_id: string, caption: string, state: string, sha256: string, fish_id: string, uploader_id: string, failure_reason: string | null, removed_at: Date | null, width: number, height: number, taken_at: Date | null, variants: { longSide: number, width: number, height: number, format: string }[] }[]
}

/**
 * Runs a copy of the build kept outside the checkout, as `node .output/server/index.mjs` on a fresh
 * machine would: nothing from this checkout's node_modules can be found from there.
 */
export async function startBuildCopy(outputDir: string, port: number) {
  const env = testEnv()
  let output = ''
  const child = spawn(process.execPath, [join(outputDir, 'server/index.mjs')], {
    cwd: dirname(outputDir),
    env: {
      PATH: process.env.PATH,
      NODE_ENV: 'production',
      NITRO_HOST: '127.0.0.1',
      NITRO_PORT: String(port),
      NUXT_DATABASE_URL: env.databaseUrl,
      NUXT_SESSION_PASSWORD: env.sessionPassword,
      NUXT_SESSION_COOKIE_SECURE: 'false',
      NUXT_APP_ORIGIN: `http://127.0.0.1:${port}`,
      NUXT_STORAGE_DIR: env.storageDir,
      NUXT_SMTP_PORT: String(env.smtpPort),
      // The object-storage pass: the copy must find the S3 client in .output too.
      ...Object.fromEntries(Object.entries(process.env).filter(([name]) => name.startsWith('NUXT_STORAGE_S3_'))),
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  child.stdout!.on('data', (d: Buffer) => (output += d.toString()))
  child.stderr!.on('data', (d: Buffer) => (output += d.toString()))
  const exited = new Promise<void>(done => child.once('exit', () => done()))
  const url = `http://127.0.0.1:${port}`
  const deadline = Date.now() + 30_000
  for (;;) {
    if (child.exitCode !== null) throw new Error(`copied build exited early:\n${output}`)
    if (await fetch(`${url}/api/health`).then(r => r.ok, () => false)) break
    if (Date.now() > deadline) throw new Error(`copied build did not start:\n${output}`)
    await new Promise(r => setTimeout(r, 150))
  }
  return {
    url,
    output: () => output,
    stop: async () => {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM')
      await exited
    },
  }
}

/**
 * An invented koi seen from above, drawn as SVG and rendered by sharp: white body, red patches placed
 * by `seed`, on dark pond water. Looks like a photo in screenshots; made of flat colours, it is small.
 */
export async function makeKoiPhoto(seed: number, options: { width?: number, height?: number, takenAt?: string } = {}) {
  const { width = 2400, height = 1800 } = options
  let state = seed
  const random = () => ((state = (state * 1103515245 + 12345) % 2147483648) / 2147483648)
  const patches = Array.from({ length: 3 + Math.floor(random() * 3) }, () => {
    const x = 700 + random() * 900
    const y = 780 + random() * 240
    return `<ellipse cx="${x.toFixed(0)}" cy="${y.toFixed(0)}" rx="${(90 + random() * 120).toFixed(0)}" ry="${(60 + random() * 70).toFixed(0)}" fill="#d8321e" opacity="0.95"/>`
  }).join('')
  const tilt = (random() * 40 - 20).toFixed(1)
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 2400 1800">
    <defs><radialGradient id="w" cx="50%" cy="45%" r="70%"><stop offset="0" stop-color="#2f5d55"/><stop offset="1" stop-color="#0c2a2a"/></radialGradient>
    <clipPath id="b"><ellipse cx="1150" cy="900" rx="620" ry="210"/></clipPath></defs>
    <rect width="2400" height="1800" fill="url(#w)"/>
    <g transform="rotate(${tilt} 1200 900)">
      <path d="M1720 900 l330 -190 -60 190 60 190 z" fill="#f3eee4" opacity="0.85"/>
      <ellipse cx="860" cy="720" rx="170" ry="60" fill="#f3eee4" opacity="0.7" transform="rotate(-25 860 720)"/>
      <ellipse cx="860" cy="1080" rx="170" ry="60" fill="#f3eee4" opacity="0.7" transform="rotate(25 860 1080)"/>
      <ellipse cx="1150" cy="900" rx="620" ry="210" fill="#f6f2ea"/>
      <g clip-path="url(#b)">${patches}</g>
      <circle cx="620" cy="860" r="14" fill="#1b1b1b"/><circle cx="620" cy="940" r="14" fill="#1b1b1b"/>
    </g></svg>`
  let image = sharp(Buffer.from(svg)).jpeg({ quality: 88 })
  if (options.takenAt) image = image.withExif({ IFD2: { DateTimeOriginal: options.takenAt } })
  return image.toBuffer()
}
