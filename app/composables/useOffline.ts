// Whether this device is offline, and when what is on screen was saved. Browser-only state: the server render
// always sees "online" (it has the network by definition), and the plugin sets the truth once the page runs.
const online = ref(true)
/** The earliest save time of the answers this page showed from the device (null: all came from the server). */
const shownSavedAt = ref<string | null>(null)
/** When the page on screen last got its answers from the server. */
const loadedAt = ref(new Date().toISOString())

export function useOfflineState() {
  return { online: readonly(online), shownSavedAt: readonly(shownSavedAt), loadedAt: readonly(loadedAt) }
}

export function setOnline(value: boolean) {
  online.value = value
}

export function noteShownFromDevice(savedAt: string) {
  if (!shownSavedAt.value || savedAt < shownSavedAt.value) shownSavedAt.value = savedAt
}

export function startPageAnswers() {
  shownSavedAt.value = null
}

export function notePageLoaded() {
  if (online.value && !shownSavedAt.value) loadedAt.value = new Date().toISOString()
}

/**
 * useFetch for the answers a person needs at the pond side (their ponds, a pond's fish, a fish's key facts and
 * the first page of its record): each answer is kept on the device for the signed-in account, and with no
 * network the kept one is shown instead. Other answers are never kept.
 */
export function useSavedFetch<T>(url: () => string, options: { key: string, query?: MaybeRefOrGetter<Record<string, unknown>> }) {
  const nuxtApp = useNuxtApp()
  // On the server this forwards the browser's cookie, as useFetch's own default does.
  const fetcher = useRequestFetch()
  const fetchKept = async (request: string, opts?: { query?: Record<string, unknown> }) => {
    const key = answerKey(request, opts?.query)
    try {
      const data = await fetcher<T>(request, opts as never)
      if (import.meta.client) void saveAnswer(key, data).catch(() => {})
      return data
    }
    catch (error) {
      if (import.meta.client && isNetworkFailure(error)) {
        const kept = await savedAnswer(key).catch(() => undefined)
        if (kept) {
          noteShownFromDevice(kept.savedAt)
          return kept.data as T
        }
      }
      throw error
    }
  }
  const result = useFetch<T>(url, { key: options.key, query: options.query, $fetch: fetchKept as unknown as typeof $fetch })
  if (import.meta.client && nuxtApp.isHydrating && result.data.value != null) {
    // The server render's answer is kept too: a page opened once with a connection opens again without one.
    void saveAnswer(answerKey(url(), toValue(options.query)), result.data.value).catch(() => {})
  }
  return result
}

/**
 * Fetches an answer the page does not need yet (it loads further down, when scrolled to) and keeps it on the device,
 * once the page is idle and only online: a fish opened with a connection then shows it offline too.
 */
export function keepForOffline(url: () => string) {
  if (import.meta.server) return
  onMounted(() => {
    const keep = () => {
      if (!navigator.onLine || !currentAccount()) return
      const request = url()
      void $fetch(request).then(data => saveAnswer(answerKey(request), data)).catch(() => {})
    }
    if ('requestIdleCallback' in window) requestIdleCallback(keep, { timeout: 5_000 })
    else setTimeout(keep, 2_000)
  })
}
