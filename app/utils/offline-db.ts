import { deleteDB, openDB, type DBSchema, type IDBPDatabase } from 'idb'
import { FetchError } from 'ofetch'
import type { OutboxItem } from '~/utils/outbox-items'

// What this device keeps for the signed-in account, in one IndexedDB database per account (named by a hash of the
// user id, so the name says nothing about the person): the answers of pages opened recently, and the outbox.
// Sign-out and a different account signing in delete all of it (clearDevice).

export const DB_PREFIX = 'fintrail-'
const ACCOUNT_KEY = 'fintrail-account'
/** Typed but unsent form contents (TimelineEntryForm) are medical data too. */
const LOCAL_PREFIXES = ['fintrail-draft:', ACCOUNT_KEY]

export interface SavedAnswer { key: string, data: unknown, savedAt: string }
/** A photo as shown on a page opened with a connection (the size the browser chose), to show it again offline. */
export interface KeptPhoto { photoId: string, image: Blob, savedAt: string }

interface DeviceSchema extends DBSchema {
  saved: { key: string, value: SavedAnswer }
  outbox: { key: string, value: OutboxItem, indexes: { seq: number } }
  photos: { key: string, value: KeptPhoto }
}

export type DeviceDb = IDBPDatabase<DeviceSchema>

export async function accountKeyOf(userId: string): Promise<string> {
  const digest = await crypto.subtle.digest('SHA-256', new TextEncoder().encode(`fintrail:${userId}`))
  return [...new Uint8Array(digest)].slice(0, 12).map(b => b.toString(16).padStart(2, '0')).join('')
}

export function currentAccount(): string | null {
  try {
    return localStorage.getItem(ACCOUNT_KEY)
  }
  catch {
    return null
  }
}

const opened = new Map<string, Promise<DeviceDb>>()

export function openDeviceDb(account = currentAccount()): Promise<DeviceDb> | null {
  if (!account || typeof indexedDB === 'undefined') return null
  let db = opened.get(account)
  if (!db) {
    db = openDB<DeviceSchema>(`${DB_PREFIX}${account}`, 2, {
      upgrade(database, oldVersion) {
        if (oldVersion < 1) {
          database.createObjectStore('saved', { keyPath: 'key' })
          database.createObjectStore('outbox', { keyPath: 'id' }).createIndex('seq', 'seq')
        }
        if (oldVersion < 2) database.createObjectStore('photos', { keyPath: 'photoId' })
      },
      // Another tab deleting the database (sign-out) must not wait for this one.
      blocking() {
        void db?.then(d => d.close())
        opened.delete(account)
      },
    })
    opened.set(account, db)
  }
  return db
}

/** Makes `userId` the device's account; another account's data, if any, is deleted first. */
export async function adoptAccount(userId: string) {
  const account = await accountKeyOf(userId)
  const before = currentAccount()
  if (before === account) return account
  if (before) await clearDevice()
  localStorage.setItem(ACCOUNT_KEY, account)
  return account
}

/** Everything this app keeps about a person on the device: IndexedDB, drafts, and caches other than the app's own files. */
export async function clearDevice() {
  for (const [, db] of opened) (await db.catch(() => null))?.close()
  opened.clear()
  const names = typeof indexedDB.databases === 'function' ? (await indexedDB.databases()).map(d => d.name ?? '') : []
  const account = currentAccount()
  if (account) names.push(`${DB_PREFIX}${account}`)
  for (const name of new Set(names)) {
    if (name.startsWith(DB_PREFIX)) await deleteDB(name)
  }
  for (const key of Object.keys(localStorage)) {
    if (LOCAL_PREFIXES.some(prefix => key.startsWith(prefix))) localStorage.removeItem(key)
  }
  if (typeof caches !== 'undefined') {
    // The service worker keeps only the built files and the empty page shell (service-worker/sw.ts); any other
    // cache is not ours to keep past a sign-out.
    for (const name of await caches.keys()) {
      if (!name.startsWith('workbox-precache') && !name.startsWith('fintrail-shell-')) await caches.delete(name)
    }
  }
}

export async function saveAnswer(key: string, data: unknown) {
  const db = await openDeviceDb()
  // The answer is stored as structured data: a reactive proxy cannot be cloned.
  await db?.put('saved', { key, data: JSON.parse(JSON.stringify(data)), savedAt: new Date().toISOString() })
}

export async function savedAnswer(key: string): Promise<SavedAnswer | undefined> {
  const db = await openDeviceDb()
  return db?.get('saved', key)
}

/**
 * Keeps the picture of a photo shown online, once per photo. The browser has just loaded it, so this reads its own
 * HTTP cache (the photo answers are `private, max-age=86400`) rather than the network.
 */
export async function keepPhoto(photoId: string, url: string) {
  const db = await openDeviceDb()
  if (!db || await db.getKey('photos', photoId)) return
  const response = await fetch(url, { credentials: 'same-origin' })
  if (!response.ok || !response.headers.get('content-type')?.startsWith('image/')) return
  await db.put('photos', { photoId, image: await response.blob(), savedAt: new Date().toISOString() })
}

export async function keptPhoto(photoId: string): Promise<Blob | undefined> {
  const db = await openDeviceDb()
  return (await db?.get('photos', photoId))?.image
}

/** No answer at all (no network, or the answer was lost on the way), as opposed to the server refusing. */
export function isNetworkFailure(error: unknown) {
  if (error instanceof FetchError) return !error.response
  return error instanceof TypeError
}

/** The key an answer is kept under: the path and its query, in a fixed order. */
export function answerKey(url: string, query?: Record<string, unknown>) {
  const params = new URLSearchParams()
  for (const [name, value] of Object.entries(query ?? {}).sort(([a], [b]) => a.localeCompare(b))) {
    if (value !== undefined && value !== null && value !== '') params.set(name, String(value))
  }
  const search = params.toString()
  return search ? `${url}?${search}` : url
}
