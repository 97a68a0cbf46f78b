import { existsSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { Worker } from 'node:worker_threads'
import { and, eq, inArray, isNull } from 'drizzle-orm'
import { decodeForFeatures } from '../fish-id/decode'
import { FEATURES_VERSION, type RgbImage } from '../fish-id/features'
import type { RankedFish } from '../fish-id/match'
import type { WorkerRequest, WorkerResponse } from '../fish-id/worker'
import { derivedKey } from '../storage/file-storage'

export const PHOTO_FEATURES_JOB = 'photo-features'

// ---- the worker thread (OpenCV lives there; the event loop only waits for its answer) ----

const WORKER_FILE = 'which-fish-worker.cjs'
let worker: Worker | undefined
let nextId = 1
const waiting = new Map<number, { resolve: (response: WorkerResponse) => void, reject: (error: Error) => void }>()

function workerPath() {
  // The built file sits beside the server's entry; route chunks live a few folders below it.
  let dir = dirname(fileURLToPath(import.meta.url))
  for (let i = 0; i < 6; i++) {
    if (existsSync(join(dir, WORKER_FILE))) return join(dir, WORKER_FILE)
    dir = dirname(dir)
  }
  throw new Error(`${WORKER_FILE} was not built: run nuxt build`)
}

function startWorker() {
  const started = new Worker(workerPath())
  started.on('message', (response: WorkerResponse) => {
    waiting.get(response.id)?.resolve(response)
    waiting.delete(response.id)
  })
  started.on('error', (error) => {
    console.error('[which-fish] worker failed:', error)
    for (const pending of waiting.values()) pending.reject(error)
    waiting.clear()
    worker = undefined
  })
  started.on('exit', () => {
    if (worker === started) worker = undefined
  })
  // An idle worker does not keep the process alive.
  started.unref()
  return started
}

type WithoutId<T> = T extends unknown ? Omit<T, 'id'> : never

function ask(request: WithoutId<WorkerRequest>): Promise<WorkerResponse> {
  worker ??= startWorker()
  const id = nextId++
  const pending = new Promise<WorkerResponse>((resolve, reject) => waiting.set(id, { resolve, reject }))
  worker.postMessage({ ...request, id })
  return pending
}

/**
 * Starts the worker and compiles OpenCV's WebAssembly (about 3 s and 60 MB) before anyone needs it,
 * so the first "Which fish is this?" of the day answers as fast as the next ones.
 */
export async function warmWhichFish() {
  const response = await ask({ kind: 'warm' })
  if (!response.ok) throw new Error(response.message)
}

export class NoFishInPhoto extends Error {}

// ---- features of reference photos: computed once, when a photo from above becomes ready ----

/** Computes and stores the features of one ready photo; a photo where no fish stands out is stored as unusable (null-free: skipped). */
export async function computePhotoFeatures(photoId: string) {
  const [photo] = await useDb().select().from(schema.photos).where(eq(schema.photos.id, photoId)).limit(1)
  if (!photo || photo.state !== 'ready' || photo.removedAt) return null
  // The 1024 px copy: made by the pipeline already, and plenty for a 480 px feature picture.
  const image = await decodeForFeatures(await useFileStorage().readBuffer(derivedKey(photo.id, '1024.jpg')))
  const response = await ask({ kind: 'extract', image })
  if (!response.ok) {
    if (response.noFish) return null
    throw new Error(response.message)
  }
  const features = Buffer.from(response.features!)
  await useDb().insert(schema.photoFeatures).values({ photoId, version: FEATURES_VERSION, features })
    .onConflictDoUpdate({ target: schema.photoFeatures.photoId, set: { version: FEATURES_VERSION, features, createdAt: new Date() } })
  return features
}

/** After a photo from above becomes ready (or is marked as taken from above): its features, in the background. */
export async function queuePhotoFeatures(photo: { id: string, view: string, state: string }) {
  if (photo.view !== 'top' || photo.state !== 'ready') return
  await sendJob(PHOTO_FEATURES_JOB, { photoId: photo.id }, { singletonKey: `photo-features:${photo.id}` })
    .catch(error => console.error('[which-fish] could not queue features:', error))
}

// ---- the comparison ----

export interface PondReference { photoId: string, fishId: string, features: Buffer | null, version: number | null }

/** Ready photos from above of the pond's living fish, with their stored features where they exist. */
export async function pondReferences(pondId: string): Promise<PondReference[]> {
  return useDb().select({ photoId: schema.photos.id, fishId: schema.photos.fishId, features: schema.photoFeatures.features, version: schema.photoFeatures.version })
    .from(schema.photos)
    .innerJoin(schema.fish, eq(schema.fish.id, schema.photos.fishId))
    .leftJoin(schema.photoFeatures, eq(schema.photoFeatures.photoId, schema.photos.id))
    .where(and(eq(schema.fish.pondId, pondId), eq(schema.fish.status, 'alive'), eq(schema.photos.view, 'top'), eq(schema.photos.state, 'ready'), isNull(schema.photos.removedAt)))
}

/** Ranks the pond's fish for a new picture. References still without features get them now (and keep them). */
export async function rankPondFish(image: RgbImage, references: PondReference[], limit = 5): Promise<RankedFish[]> {
  const usable: { photoId: string, fishId: string, features: Uint8Array }[] = []
  for (const reference of references) {
    let features = reference.version === FEATURES_VERSION ? reference.features : null
    features ??= await computePhotoFeatures(reference.photoId).catch((error) => {
      console.error(`[which-fish] features of photo ${reference.photoId} failed:`, error)
      return null
    })
    if (features) usable.push({ photoId: reference.photoId, fishId: reference.fishId, features: new Uint8Array(features) })
  }
  if (!usable.length) return []
  const response = await ask({ kind: 'rank', image, references: usable, limit })
  if (!response.ok) {
    if (response.noFish) throw new NoFishInPhoto(response.message)
    throw new Error(response.message)
  }
  return response.candidates!
}

/** How many usable reference photos each fish has (ready, from above, not removed). */
export async function referenceCounts(fishIds: string[]) {
  if (!fishIds.length) return new Map<string, number>()
  const rows = await useDb().select({ fishId: schema.photos.fishId }).from(schema.photos)
    .where(and(inArray(schema.photos.fishId, fishIds), eq(schema.photos.view, 'top'), eq(schema.photos.state, 'ready'), isNull(schema.photos.removedAt)))
  const counts = new Map<string, number>()
  for (const row of rows) counts.set(row.fishId, (counts.get(row.fishId) ?? 0) + 1)
  return counts
}
