// The worker thread of "Which fish is this?": OpenCV runs here, never on the server's event loop.
// Built into .output/server/which-fish-worker.cjs by the hook in nuxt.config.ts.
import { parentPort } from 'node:worker_threads'
import { extractFeatures, NoFishFound, packFeatures, unpackFeatures, type RgbImage } from './features'
import { rankFish, type RankedFish } from './match'
import { loadOpenCv, openCv } from './opencv'

export type WorkerRequest
  = | { id: number, kind: 'warm' }
    | { id: number, kind: 'extract', image: RgbImage }
    | { id: number, kind: 'rank', image: RgbImage, references: { photoId: string, fishId: string, features: Uint8Array }[], limit: number }

export type WorkerResponse
  = | { id: number, ok: true, features?: Uint8Array, candidates?: RankedFish[] }
    | { id: number, ok: false, noFish: boolean, message: string }

parentPort?.on('message', async (request: WorkerRequest) => {
  try {
    await loadOpenCv()
    if (request.kind === 'warm') {
      parentPort!.postMessage({ id: request.id, ok: true } satisfies WorkerResponse)
      return
    }
    const cv = openCv()
    if (request.kind === 'extract') {
      const features = packFeatures(extractFeatures(cv, request.image))
      parentPort!.postMessage({ id: request.id, ok: true, features } satisfies WorkerResponse)
      return
    }
    const query = extractFeatures(cv, request.image, { withMirror: true })
    const references = request.references.map(r => ({ photoId: r.photoId, fishId: r.fishId, features: unpackFeatures(r.features) }))
    parentPort!.postMessage({ id: request.id, ok: true, candidates: rankFish(cv, query, references, request.limit) } satisfies WorkerResponse)
  }
  catch (error) {
    parentPort!.postMessage({ id: request.id, ok: false, noFish: error instanceof NoFishFound, message: error instanceof Error ? error.message : String(error) } satisfies WorkerResponse)
  }
})
