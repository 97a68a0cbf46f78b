import { mkdirSync } from 'node:fs'
import type { IncomingMessage } from 'node:http'
import { FileStore } from '@tus/file-store'
import { S3Store } from '@tus/s3-store'
import { Server, type DataStore } from '@tus/server'
import type { H3Event } from 'h3'
import { joinURL } from 'ufo'
import { MAX_UPLOAD_BYTES, UPLOAD_EXPIRY_HOURS } from '#shared/utils/photo-limits'
import { uploadMetadataSchema } from '#shared/utils/photo-schemas'
import { PHOTO_ADD_ROLES } from './photo-access'
import { PhotoRejection } from './photo-files'
import { finishUpload } from './photo-pipeline'
import { UPLOAD_ID_PATTERN, uploadsDir } from './photo-storage'
import { s3ClientConfig } from '../storage/s3-storage'
import { PostgresLocker } from './tus-locker'

/** What a tus hook throws to answer the client: @tus/server sends `status_code` and `body` as they are. */
export class TusResponse extends Error {
  constructor(public status_code: number, public body: string) {
    super(body)
  }
}

// tus hooks get a web Request; the H3 event (session, runtime config) is found again through the Node request.
const eventsByRequest = new WeakMap<IncomingMessage, H3Event>()

function eventOf(req: Request): H3Event {
  const node = (req as Request & { runtime?: { node?: { req?: IncomingMessage } } }).runtime?.node?.req
  const event = node ? eventsByRequest.get(node) : undefined
  if (!event) throw new TusResponse(500, 'The upload request lost its context; try again.\n')
  return event
}

/** Turns our own and H3's errors into the shape tus answers with; anything unexpected is logged and stays vague. */
function toTusResponse(error: unknown): TusResponse | { status_code: number, body: string } {
  if (error instanceof TusResponse) return error
  if (error instanceof PhotoRejection) return new TusResponse(error.status, `${error.message}\n`)
  if (isStorageFault(error)) {
    console.error('[uploads] storage not writable:', (error as Error).message)
    return new TusResponse(503, `${storageUnavailableMessage(error)}\n`)
  }
  // @tus/s3-store's own calls to the bucket fail with the SDK's errors, which carry the HTTP status they got.
  if ((error as { $metadata?: unknown })?.$metadata !== undefined || (error as { name?: string })?.name === 'TimeoutError') {
    console.error('[uploads] object store failed:', (error as Error).message)
    return new TusResponse(503, `${storageUnavailableMessage({ code: 'ESTORAGE' })}\n`)
  }
  if (isDatabaseUnavailable(error)) return new TusResponse(503, 'The records cannot be reached just now; the bytes already sent are kept. Try again in a few seconds.\n')
  if (isError(error)) return new TusResponse(error.statusCode, `${error.message || error.statusMessage}\n`)
  const tusError = error as { status_code?: number, body?: string }
  if (typeof tusError?.status_code === 'number' && typeof tusError.body === 'string') return { status_code: tusError.status_code, body: tusError.body }
  console.error('[uploads] unexpected error:', error)
  return new TusResponse(500, 'The server could not store this upload. Try again; the bytes already sent are kept.\n')
}

async function guard<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work()
  }
  catch (error) {
    throw toTusResponse(error)
  }
}

let tus: Server | undefined

/** @tus/s3-store 2.0.7 leaves the piece smaller than a part (`<id>.part`) behind when an upload is given up. */
class UploadBucket extends S3Store {
  override async remove(id: string) {
    await super.remove(id)
    await useFileStorage().remove(`${id}.part`)
  }
}

/** Where tus keeps uploads in progress: the bucket (as multipart uploads) or the storage folder. */
function uploadStore(): DataStore {
  const expirationPeriodInMilliseconds = UPLOAD_EXPIRY_HOURS * 3600_000
  const s3 = s3Settings()
  if (s3) {
    // No cache of upload info in this process's memory (its default): another instance may have moved the upload on.
    const noCache = { get: async () => undefined, set: async () => {}, delete: async () => {}, list: async () => [] }
    return new UploadBucket({ s3ClientConfig: { bucket: s3.bucket, ...s3ClientConfig(s3) }, expirationPeriodInMilliseconds, partSize: 8 * 1024 * 1024, useTags: false, cache: noCache })
  }
  // @tus/file-store creates its folder in a callback that throws, which would end the process: make it here first.
  try {
    mkdirSync(uploadsDir(), { recursive: true })
  }
  catch (error) {
    throw createError({ statusCode: 503, statusMessage: 'Storage not writable', message: storageUnavailableMessage(error) })
  }
  return new FileStore({ directory: uploadsDir(), expirationPeriodInMilliseconds })
}

export function useTusServer(): Server {
  if (tus) return tus
  const config = useRuntimeConfig()
  const origins = new Set(String(config.appOrigin || '').split(',').map(s => s.trim()).filter(Boolean))
  const store = uploadStore()
  tus = new Server({
    path: joinURL(config.app.baseURL, '/api/uploads'),
    datastore: store,
    // Instances share the storage: an upload is locked in PostgreSQL, not in one process's memory.
    locker: new PostgresLocker(),
    relativeLocation: true,
    maxSize: MAX_UPLOAD_BYTES,
    // Not the "*" default: only our own pages may read tus answers from another origin.
    allowedOrigins: origin => origins.has(origin),
    // A finished upload is a photo now: it is removed through the gallery, not by a tus DELETE.
    disableTerminationForFinishedUploads: true,

    // Every method but OPTIONS passes here (POST, HEAD, PATCH, DELETE and GET): a session always, and for an
    // existing upload, being its uploader and still allowed to add photos to its fish.
    onIncomingRequest: (req, id) => guard(async () => {
      const event = eventOf(req)
      requireUser(event)
      if (req.method === 'POST') return
      if (!UPLOAD_ID_PATTERN.test(id)) throw new TusResponse(404, 'Upload not found\n')
      const upload = await store.getUpload(id).catch(() => null)
      if (!upload || upload.metadata?.uploaderId !== event.context.auth!.user.id) throw new TusResponse(404, 'Upload not found\n')
      await requireFishRole(event, String(upload.metadata.fishId), PHOTO_ADD_ROLES)
      // tus would hand the raw bytes (GPS included) to anyone allowed this far.
      if (req.method === 'GET') throw new TusResponse(405, 'Uploads are not downloadable; a finished photo is shown through /api/photos.\n')
    }),

    // Before a single byte is stored: who may add photos to which fish, and what the client may claim.
    onUploadCreate: (req, upload) => guard(async () => {
      const event = eventOf(req)
      if (upload.sizeIsDeferred) throw new TusResponse(400, 'Send the file size with the upload (Upload-Length); uploads of unknown length are not accepted.\n')
      if (upload.size === 0) throw new PhotoRejection(422, 'The file is empty (0 bytes). Pick the photo again from the phone\'s gallery.')
      const metadata = upload.metadata ?? {}
      const parsed = uploadMetadataSchema.safeParse({
        fishId: metadata.fishId ?? undefined,
        filename: metadata.filename ?? metadata.name ?? undefined,
        view: metadata.view || undefined,
        caption: metadata.caption ?? undefined,
      })
      if (!parsed.success) {
        const problems = parsed.error.issues.map(issue => `${issue.path.join('.')}: ${issue.message}`).join('; ')
        throw new TusResponse(400, `Upload-Metadata is incomplete: ${problems}\n`)
      }
      const { user } = await requireFishRole(event, parsed.data.fishId, PHOTO_ADD_ROLES)
      // Stored server-side with the upload; the client cannot change it later.
      return { metadata: { ...parsed.data, uploaderId: user.id } }
    }),

    onUploadFinish: (_req, upload) => guard(async (): Promise<{ headers: Record<string, string> }> => {
      // The sizes are made by a job (any instance); the answer waits for them a little, then says 'pending'.
      const waitSeconds = Number(useRuntimeConfig().photoFinishWaitSeconds)
      const outcome = await finishUpload(upload.id, { size: upload.size ?? 0, metadata: upload.metadata ?? {} }, { waitSeconds: Number.isFinite(waitSeconds) ? waitSeconds : 30 })
      if (outcome === 'busy') return { headers: { 'Photo-State': 'pending' } }
      return { headers: { 'Photo-Id': outcome.photo.id, 'Photo-State': outcome.photo.state, 'Photo-Duplicate': outcome.duplicate ? 'yes' : 'no' } }
    }),

    onResponseError: (_req, error) => toTusResponse(error),
  })
  return tus
}

/** Hands the request to tus, keeping the H3 event at hand for the hooks. */
export async function handleTusRequest(event: H3Event) {
  // tus 1.0.0, Core Protocol: an unsupported version "MUST" get 412 with Tus-Version (@tus/server answers 400).
  const version = getRequestHeader(event, 'tus-resumable')
  if (event.method !== 'OPTIONS' && version !== undefined && version !== '1.0.0') {
    setResponseHeaders(event, { 'Tus-Resumable': '1.0.0', 'Tus-Version': '1.0.0' })
    setResponseStatus(event, 412, 'Precondition Failed')
    return 'Unsupported tus version: this server speaks 1.0.0\n'
  }
  const server = useTusServer()
  eventsByRequest.set(event.node.req, event)
  await server.handle(event.node.req, event.node.res)
}
