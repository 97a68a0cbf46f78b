/**
 * Server render only: every answer a page shows on opening comes in one request to the page's own route
 * (`/api/fish/:id/page`, `/api/ponds/:id/page`) instead of one inner request per part, each through the whole h3
 * stack. Each part is handed to the useFetch that asks for it under `keys[part]`: on a first fetch Nuxt's
 * getCachedData takes `nuxtApp.static.data[key]` and does not fetch. The payload then holds each part under its
 * own key, the browser asks the parts' own routes on navigation, and refreshNuxtData(key) refetches one part alone.
 */
export async function prefetchPageParts(url: string, keys: Record<string, string>) {
  if (!import.meta.server) return
  const nuxtApp = useNuxtApp()
  try {
    const parts = await useRequestFetch()<Record<string, unknown>>(url)
    for (const [part, key] of Object.entries(keys)) {
      if (parts[part] !== undefined) nuxtApp.static.data[key] = parts[part]
    }
  }
  catch {
    // Nothing is handed over: each part asks its own route, whose answer (a 404, a 403) the page shows as before.
  }
}
