/// <reference lib="webworker" />
// The service worker keeps the app itself on the device (the built scripts, styles, fonts, icons and an empty
// page shell), never a person's records: those stay in IndexedDB under the signed-in account
// (app/utils/offline-db.ts) and are removed at sign-out. /api is never handled here, so every API request goes
// to the network exactly as without a service worker (and a test can watch and drop it).
import { cleanupOutdatedCaches, precacheAndRoute } from 'workbox-precaching'

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: (string | { url: string, revision: string | null })[] }

/** Rendered without a session and without data (`ssr: false` in nuxt.config.ts): safe to keep for anyone. */
const SHELL_URL = '/offline-shell'
const SHELL_CACHE = 'fintrail-shell-v1'

precacheAndRoute(self.__WB_MANIFEST)
cleanupOutdatedCaches()

async function keepShell() {
  // No cookie goes out, so no session comes back: the shell never carries a Set-Cookie or anyone's data.
  const response = await fetch(SHELL_URL, { credentials: 'omit', cache: 'no-store' })
  if (!response.ok) throw new Error(`The offline page shell answered ${response.status}`)
  const cache = await caches.open(SHELL_CACHE)
  await cache.put(SHELL_URL, response)
}

self.addEventListener('install', (event) => {
  event.waitUntil(keepShell().then(() => self.skipWaiting()))
})

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    for (const name of await caches.keys()) {
      if (name.startsWith('fintrail-shell-') && name !== SHELL_CACHE) await caches.delete(name)
    }
    await self.clients.claim()
  })())
})

const OFFLINE_PAGE = `<!doctype html><html lang="en"><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Offline · Fintrail</title><body style="font-family:sans-serif;padding:2rem;max-width:36rem">
<h1>Offline</h1><p>This device has no connection, and Fintrail was not saved on it yet. Open it once with a connection.</p></body></html>`

async function fromShell(): Promise<Response> {
  const shell = await caches.match(SHELL_URL, { cacheName: SHELL_CACHE })
  return shell ?? new Response(OFFLINE_PAGE, { status: 503, headers: { 'Content-Type': 'text/html; charset=utf-8' } })
}

self.addEventListener('fetch', (event) => {
  const { request } = event
  // Built files are answered by the precache route above; any other request but a page load is left alone.
  if (request.mode !== 'navigate' || request.method !== 'GET') return
  const url = new URL(request.url)
  if (url.origin !== self.location.origin || url.pathname.startsWith('/api/')) return
  // Online, pages come from the server as always; with no network the shell starts the app, which reads what
  // this device saved for the signed-in account.
  event.respondWith(fetch(request).catch(() => fromShell()))
})
