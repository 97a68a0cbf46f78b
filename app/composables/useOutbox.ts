import type { DetailedError } from 'tus-js-client'
import { FetchError } from 'ofetch'
import type { PlausibilityWarning } from '#shared/utils/plausibility'
import { UPLOAD_CHUNK_BYTES } from '#shared/utils/photo-limits'
import type { DoseItem, OutboxItem, PhotoItem } from '~/utils/outbox-items'

// The outbox: what was written on this device and not yet accepted by the server, oldest first. It sends itself
// when the device is online (at start, on the browser's "online" event, after each new item, and again after a
// lost answer with a growing pause). The ids inside the items make a second send of the same thing a no-op on the
// server. A refusal (no longer a member, role changed, unusual measurement) keeps the item with the reason.

const items = shallowRef<OutboxItem[]>([])
let running: Promise<void> | null = null
let runAgain = false
let retryTimer: ReturnType<typeof setTimeout> | undefined
let retryDelay = 2_000
let afterSend: (fishIds: string[], pondIds: string[]) => Promise<void> = async () => {}

/** What the app refreshes once items were accepted (set by the outbox plugin, which has the Nuxt context). */
export function onOutboxSent(refresh: typeof afterSend) {
  afterSend = refresh
}

async function database() {
  return openDeviceDb()
}

export async function reloadOutbox() {
  const db = await database()
  items.value = db ? await db.getAllFromIndex('outbox', 'seq') : []
}

async function put(item: OutboxItem) {
  const db = await database()
  await db?.put('outbox', item)
}

let lastSeq = 0
function nextSeq() {
  lastSeq = Math.max(Date.now() * 1000, lastSeq + 1)
  return lastSeq
}

// Omit over each member of the union, so an item keeps the fields of its own type.
type NewItem = OutboxItem extends infer T ? T extends OutboxItem ? Omit<T, 'seq' | 'createdAt' | 'state' | 'tries'> : never : never

export async function addToOutbox(item: NewItem) {
  const db = await database()
  if (!db) throw new Error('This device keeps nothing until someone signs in')
  await db.put('outbox', { ...item, seq: nextSeq(), createdAt: new Date().toISOString(), state: 'waiting', tries: 0 } as OutboxItem)
  await reloadOutbox()
  void sendOutbox()
}

export async function discardOutboxItem(id: string) {
  const db = await database()
  await db?.delete('outbox', id)
  await reloadOutbox()
}

/** Puts a refused item back in line (after the person fixed the cause, or to confirm an unusual measurement). */
export async function retryOutboxItem(id: string, acknowledged?: PlausibilityWarning[]) {
  const db = await database()
  const item = await db?.get('outbox', id)
  if (!item) return
  item.state = 'waiting'
  item.reason = undefined
  item.status = undefined
  if (item.type === 'entry' && acknowledged?.length) {
    item.body = { ...item.body, acknowledgedWarnings: acknowledged.map(w => w.code) }
    item.warnings = undefined
  }
  await put(item)
  await reloadOutbox()
  void sendOutbox()
}

type Outcome = 'sent' | 'refused' | 'later'

function reasonOf(status: number, message: string) {
  if (status === 404) return `${message || 'Not found'}. You may no longer be a member of this fish’s pond, or the fish was moved to a pond you do not belong to.`
  return message || `The server refused it (${status})`
}

async function sendPhoto(item: PhotoItem): Promise<void> {
  // Loaded only when a photo is to be sent: the profile's first load stays within its script budget.
  const { Upload } = await import('tus-js-client')
  await new Promise<void>((resolve, reject) => {
    const upload = new Upload(item.file, {
      endpoint: '/api/uploads',
      uploadUrl: item.uploadUrl ?? null,
      metadata: { fishId: item.fishId, filename: item.fileName, view: item.view, caption: item.caption },
      // Sent in parts: a connection lost half-way costs at most one part, the next try resumes from the server's offset.
      chunkSize: UPLOAD_CHUNK_BYTES,
      // The outbox itself tries again later; tus's own quick retries would only hide a lost connection.
      retryDelays: [],
      storeFingerprintForResuming: false,
      onUploadUrlAvailable: async () => {
        item.uploadUrl = upload.url ?? undefined
        await put(item)
      },
      onAfterResponse: (_request, response) => {
        const photoId = response.getHeader('Photo-Id')
        if (photoId) item.photoId = photoId
      },
      onSuccess: () => resolve(),
      onError: error => reject(error),
    })
    upload.start()
  })
}

async function sendOne(item: OutboxItem): Promise<Outcome> {
  item.state = 'sending'
  item.tries += 1
  await put(item)
  items.value = items.value.map(i => (i.id === item.id ? { ...item } : i))
  try {
    if (item.type === 'entry') await apiFetch(`/api/fish/${item.fishId}/timeline`, { method: 'POST', body: item.body })
    else if (item.type === 'water-test') await apiFetch(`/api/ponds/${item.pondId}/water-tests`, { method: 'POST', body: item.body })
    else if (item.type === 'dose') await apiFetch(`/api/timeline/${item.entryId}/doses`, { method: 'POST', body: item.body })
    else await sendPhoto(item)
    const db = await database()
    await db?.delete('outbox', item.id)
    return 'sent'
  }
  catch (error) {
    let status = 0
    let message = ''
    if (error instanceof FetchError && error.response) {
      status = error.response.status
      const data = error.data as { message?: string, statusMessage?: string, warnings?: PlausibilityWarning[] } | undefined
      message = data?.message || data?.statusMessage || error.statusMessage || ''
      if (item.type === 'entry' && status === 409 && data?.warnings?.length) item.warnings = data.warnings
    }
    const tusResponse = (error as DetailedError)?.originalResponse
    if (tusResponse) {
      status = tusResponse.getStatus()
      message = tusResponse.getBody()?.trim() ?? ''
    }
    // No answer, or the server busy or down: the item waits for the next try, unchanged.
    if (!status || status >= 500 || status === 429 || status === 408) {
      item.state = 'waiting'
      await put(item)
      return 'later'
    }
    item.state = 'failed'
    item.status = status
    item.reason = reasonOf(status, message)
    await put(item)
    return 'refused'
  }
}

async function run() {
  let later = false
  try {
    const db = await database()
    if (!db) return
    for (const item of await db.getAllFromIndex('outbox', 'seq')) {
      if (item.state === 'failed') continue
      if (!navigator.onLine) {
        later = true
        break
      }
      const outcome = await sendOne(item)
      if (outcome === 'later') {
        later = true
        break
      }
      if (outcome === 'sent') {
        // Shown as sent right away: a photo after it may take a while to upload.
        await reloadOutbox()
        // Not awaited: a slow page refresh must never hold back the items after this one.
        void afterSend(item.fishId ? [item.fishId] : [], [item.pondId]).catch(() => {})
      }
    }
  }
  finally {
    await reloadOutbox()
    clearTimeout(retryTimer)
    if (later && navigator.onLine) {
      // An answer lost on the way or a busy server: try again after a pause that grows to a minute.
      retryTimer = setTimeout(() => void sendOutbox(), retryDelay)
      retryDelay = Math.min(retryDelay * 2, 60_000)
    }
    else if (!later) retryDelay = 2_000
  }
}

/** Sends what waits, in the order written; a call while sending makes one more pass afterwards. */
export function sendOutbox(): Promise<void> {
  if (running) {
    runAgain = true
    return running
  }
  // One sender per device: two tabs of the same account would otherwise upload the same photo side by side.
  const send: Promise<void> = typeof navigator !== 'undefined' && navigator.locks
    ? navigator.locks.request('fintrail-outbox', () => run()).then(() => {})
    : run()
  const current = send.finally(() => {
    running = null
    if (runAgain) {
      runAgain = false
      void sendOutbox()
    }
  })
  running = current
  return current
}

export function forgetOutbox() {
  clearTimeout(retryTimer)
  items.value = []
}

export function useOutbox() {
  const waiting = computed(() => items.value.filter(i => i.state !== 'failed'))
  const failed = computed(() => items.value.filter(i => i.state === 'failed'))
  return { items, waiting, failed, count: computed(() => items.value.length) }
}

/** The items written for one fish, for its record ("waiting to send"); doses are shown on their course instead. */
export function useOutboxForFish(fishId: MaybeRefOrGetter<string>) {
  return computed(() => items.value.filter(i => i.fishId === toValue(fishId) && i.type !== 'dose'))
}

/** The doses of one treatment course ticked off on this device and not yet accepted, by dose number. */
export function useOutboxDoses(entryId: MaybeRefOrGetter<string | undefined>) {
  return computed(() => new Map(items.value
    .filter((i): i is DoseItem => i.type === 'dose' && i.entryId === toValue(entryId))
    .map(i => [i.body.doseNumber, i])))
}
