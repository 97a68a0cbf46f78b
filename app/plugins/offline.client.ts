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

  nuxtApp.hook('app:mounted', async () => {
    if (!session.user) return
    await reloadOutbox().catch(() => {})
    if (navigator.onLine) void sendOutbox()
  })
})
