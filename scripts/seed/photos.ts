// Photos for every demo fish: drawn by fish-patterns.ts, then put through the app's own photo code
// (type sniffing, header read, hashing and the derived sizes of server/utils/photo-derive.ts), so the
// gallery, the profile picture and the pond page show the fish as uploaded photos would.
// Rendering is the slow part, so each finished photo is kept in storage/seed-photo-cache, keyed by
// the drawing code and the photo's recipe: later seeds (every `npm test`) only link the files.
import { createHash, randomUUID } from 'node:crypto'
import { copyFile, link, mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import pLimit from 'p-limit'
import sharp from 'sharp'
import type { PhotoVariant } from '../../server/db/schema/photos'
import { makeDerived, readPhotoHeader } from '../../server/utils/photo-derive'
import { sha256OfFile, sniffPhotoType } from '../../server/utils/photo-files'
import { decodeForFeatures } from '../../server/fish-id/decode'
import { extractFeatures, FEATURES_VERSION, packFeatures } from '../../server/fish-id/features'
import { fishPattern, renderFishJpeg, type FishPattern, type SceneOptions } from './fish-patterns'
import { seededRandom } from './growth'

const here = dirname(fileURLToPath(import.meta.url))
const ROOT = resolve(here, '..', '..')
const CACHE_DIR = join(ROOT, 'storage', 'seed-photo-cache')
const WIDTH = 960
const HEIGHT = 720

export type PhotoView = 'top' | 'left' | 'right' | 'closeup' | 'other'

export interface DemoPhotoFish {
  name: string
  species: 'koi' | 'goldfish'
  variety: string
  /** The first photo is from the day the fish was first recorded. */
  firstPhotoOn: string
  /** The newest photo is from this day (the fish's last spring, or the last spring it was alive). */
  latestPhotoOn: string
}

export interface PreparedPhoto {
  id: string
  fishName: string
  uploadId: string
  originalName: string
  view: PhotoView
  caption: string
  takenAt: Date
  mime: string
  width: number
  height: number
  bytes: number
  sha256: string
  variants: PhotoVariant[]
  /** The photo that becomes the fish's profile picture. */
  profile: boolean
  /** "Which fish is this?" features of a photo from above (server/fish-id/features.ts), packed. */
  features: Buffer | null
  featuresVersion: number
}

/** One number per fish name: the same fish looks the same on every run. */
export function patternSeed(name: string) {
  return createHash('sha256').update(`fintrail-demo:${name}`).digest().readUInt32BE(0)
}

export function demoPattern(fish: Pick<DemoPhotoFish, 'name' | 'species' | 'variety'>): FishPattern {
  return fishPattern(patternSeed(fish.name), fish.species, fish.variety)
}

interface Recipe {
  scene: SceneOptions
  /** Cut the head out of the scene (a close-up); otherwise the whole scene. */
  headCrop?: boolean
}

function recipes(fish: DemoPhotoFish, pattern: FishPattern): { recipe: Recipe, view: PhotoView, caption: string, takenOn: string, profile: boolean }[] {
  const random = seededRandom(pattern.seed ^ 0x9e3779b9)
  const adult = pattern.build === 'round' ? 0.45 : 0.6
  const angle = (random() - 0.5) * 70 + (random() < 0.5 ? 180 : 0)
  const main: Recipe = { scene: { width: WIDTH, height: HEIGHT, angle, bodyLength: adult, cx: 0.5, cy: 0.5 } }
  const young: Recipe = { scene: { width: WIDTH, height: HEIGHT, angle: (random() - 0.5) * 80 + (random() < 0.5 ? 180 : 0), bodyLength: adult * 0.7, cx: 0.45 + random() * 0.1, cy: 0.45 + random() * 0.1, backgroundSeed: pattern.seed + 17 } }
  return [
    { recipe: main, view: 'top', caption: 'From above, at the spring check', takenOn: fish.latestPhotoOn, profile: true },
    { recipe: young, view: 'top', caption: 'From above, when first recorded', takenOn: fish.firstPhotoOn, profile: false },
    { recipe: { ...main, headCrop: true }, view: 'closeup', caption: 'Head, from above', takenOn: fish.latestPhotoOn, profile: false },
  ]
}

const scenes = new Map<string, Promise<Buffer>>()
async function render(pattern: FishPattern, recipe: Recipe) {
  // The close-up is cut from the same scene as the main photo: draw it once.
  const sceneKey = JSON.stringify([pattern.seed, recipe.scene])
  if (!scenes.has(sceneKey)) scenes.set(sceneKey, renderFishJpeg(pattern, recipe.scene, { quality: 86 }))
  const jpeg = await scenes.get(sceneKey)!
  if (!recipe.headCrop) return jpeg
  // Where the head is in the picture: the drawing puts the snout 0.55 body lengths before the centre.
  const { width, height, angle = 0, bodyLength = 0.6, cx = 0.5, cy = 0.5 } = recipe.scene
  const length = bodyLength * width
  const radians = (angle * Math.PI) / 180
  const headX = cx * width - Math.cos(radians) * 0.4 * length
  const headY = cy * height - Math.sin(radians) * 0.4 * length
  const cropWidth = Math.round(length * 0.62)
  const cropHeight = Math.round(cropWidth * 0.75)
  const left = Math.round(Math.min(Math.max(headX - cropWidth / 2, 0), width - cropWidth))
  const top = Math.round(Math.min(Math.max(headY - cropHeight / 2, 0), height - cropHeight))
  return sharp(jpeg).extract({ left, top, width: cropWidth, height: cropHeight }).jpeg({ quality: 86 }).toBuffer()
}

interface CachedPhoto {
  mime: string
  width: number
  height: number
  bytes: number
  sha256: string
  variants: PhotoVariant[]
}

let codeVersion: string | undefined
/** The drawing and processing code: a change to either makes new photos. */
async function drawingCodeVersion() {
  if (!codeVersion) {
    const hash = createHash('sha256')
    for (const file of ['scripts/seed/fish-patterns.ts', 'scripts/seed/photos.ts', 'server/utils/photo-derive.ts', 'shared/utils/photo-limits.ts', 'server/fish-id/features.ts', 'server/fish-id/decode.ts']) {
      hash.update(await readFile(join(ROOT, file)))
    }
    codeVersion = hash.digest('hex')
  }
  return codeVersion
}

async function exists(path: string) {
  return stat(path).then(() => true, () => false)
}

/** Renders the photo and makes its derived sizes with the app's code, once per recipe. */
async function cachedPhoto(pattern: FishPattern, recipe: Recipe): Promise<{ dir: string, meta: CachedPhoto }> {
  const key = createHash('sha256').update(await drawingCodeVersion()).update(JSON.stringify({ pattern, recipe })).digest('hex').slice(0, 32)
  const dir = join(CACHE_DIR, key)
  if (await exists(join(dir, 'meta.json'))) return { dir, meta: JSON.parse(await readFile(join(dir, 'meta.json'), 'utf8')) as CachedPhoto }
  const work = `${dir}.tmp-${randomUUID()}`
  await mkdir(work, { recursive: true })
  try {
    const original = join(work, 'original')
    const bytes = await render(pattern, recipe)
    await writeFile(original, bytes)
    const mime = await sniffPhotoType(original, bytes.length)
    const header = await readPhotoHeader(original)
    const variants = await makeDerived(original, join(work, 'derived'))
    const meta: CachedPhoto = { mime, width: header.uprightWidth, height: header.uprightHeight, bytes: bytes.length, sha256: await sha256OfFile(original), variants }
    await writeFile(join(work, 'meta.json'), JSON.stringify(meta))
    // Another seed running at the same time may have finished first: either copy will do.
    await rename(work, dir).catch(async () => rm(work, { recursive: true, force: true }))
    return { dir, meta }
  }
  catch (error) {
    await rm(work, { recursive: true, force: true })
    throw error
  }
}

/** Features as the server computes them when a photo from above becomes ready: from the 1024 px copy. */
async function cachedFeatures(dir: string) {
  const file = join(dir, `features-v${FEATURES_VERSION}.bin`)
  if (await exists(file)) return readFile(file)
  // OpenCV takes a second or two to start: loaded only when some photo has no features yet.
  const { loadOpenCv, openCv } = await import('../../server/fish-id/opencv')
  await loadOpenCv()
  const packed = packFeatures(extractFeatures(openCv(), await decodeForFeatures(join(dir, 'derived', '1024.jpg'))))
  const partial = `${file}.tmp-${randomUUID()}`
  await writeFile(partial, packed)
  await rename(partial, file)
  return packed
}

/** A second name for the cached file where the file system allows it, else a copy. */
async function place(from: string, to: string) {
  await mkdir(dirname(to), { recursive: true })
  await link(from, to).catch(() => copyFile(from, to))
}

/**
 * Writes every demo photo's original and derived files into the storage folder the app reads
 * (NUXT_STORAGE_DIR, as `npm start` and `npm test` set it) and returns the rows to insert.
 */
export async function prepareDemoPhotos(fish: DemoPhotoFish[], storageDir: string): Promise<PreparedPhoto[]> {
  const limit = pLimit(2)
  const jobs = fish.flatMap((f) => {
    const pattern = demoPattern(f)
    return recipes(f, pattern).map((planned, index) => limit(async (): Promise<PreparedPhoto> => {
      const { dir, meta } = await cachedPhoto(pattern, planned.recipe)
      const id = randomUUID()
      await place(join(dir, 'original'), join(storageDir, 'photos', 'originals', id))
      for (const file of await readdir(join(dir, 'derived'))) {
        await place(join(dir, 'derived', file), join(storageDir, 'photos', 'derived', id, file))
      }
      const features = planned.view === 'top' ? await cachedFeatures(dir) : null
      const slug = f.name.toLowerCase()
      return {
        id, fishName: f.name, uploadId: createHash('sha256').update(`demo-photo:${f.name}:${index}:${id}`).digest('hex').slice(0, 32),
        originalName: `${slug}-${planned.view === 'top' ? 'from-above' : planned.view}-${planned.takenOn}.jpg`,
        view: planned.view, caption: planned.caption, takenAt: new Date(`${planned.takenOn}T10:30:00Z`),
        ...meta, profile: planned.profile, features, featuresVersion: FEATURES_VERSION,
      }
    }))
  })
  return Promise.all(jobs)
}
