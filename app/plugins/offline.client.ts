// Starts the offline parts once the app runs in the browser: the online/offline state for the banner, and the
// outbox, which sends what waits whenever the device is (back) online.
export default defineNuxtPlugin((nuxtApp) => {
  const session = useSessionStore()
  const router = useRouter()

  setOnline(navigator.onLine)
  window.addEventListener('online', () => {
    setOnline(true)
    void sendOutbox()
  })
  window.addEventListener('offline', () => setOnline(false))

  router.beforeEach(() => startPageAnswers())
  nuxtApp.hook('page:finish', () => notePageLoaded())

  onOutboxSent(async (fishIds, pondIds) => {
    const keys = [
      ...fishIds.flatMap(id => [...fishRecordKeys(id), `fish-photos-${id}`]),
      ...pondIds.flatMap(id => [`pond-fish-${id}`, `pond-length-weight-${id}`, `water-tests-${id}`]),
    ]
    await nuxtApp.runWithContext(() => refreshNuxtData(keys))
  })

  // The service worker keeps the app on the device (service-worker/sw.ts); a new build's worker takes over by itself.
  if ('serviceWorker' in navigator) {
    nuxtApp.hook('app:mounted', () => {
      navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch(() => { /* the app works online without it */ })
    })
  }

  nuxtApp.hook('app:mounted', async () => {
    if (!session.user) return
    await reloadOutbox().catch(() => {})
    if (navigator.onLine) void sendOutbox()
  })
})
