import type { TimelineEntryView } from '~/utils/api-shapes'
import { FetchError } from 'ofetch'
import type { ApiResponse } from '~/utils/api-fetch'

type RecordPage = ApiResponse<'/api/fish/:fishId/record/entries'>

export interface HealthRecordEntries {
  entries: TimelineEntryView[]
  /** Why reading stopped before the last page, or null when every page arrived. */
  stoppedBecause: string | null
}

/**
 * The health record: its head comes with the server render; the entries are read in the browser,
 * page by page in keyset order up to the record's `asOf`, so neither the server render nor any one
 * response grows with a long life (5,000 entries are ten requests of 500).
 */
export function useHealthRecord(fishId: MaybeRefOrGetter<string>) {
  const summary = useFetch<ApiResponse<'/api/fish/:fishId/record'>>(() => `/api/fish/${toValue(fishId)}/record`, { key: `fish-record-${toValue(fishId)}` })
  const loaded = ref(0)
  const entries = useAsyncData<HealthRecordEntries>(`fish-record-entries-${toValue(fishId)}`, async () => {
    // The head first: its `asOf` fixes which entries the pages hold.
    await summary
    const head = summary.data.value
    if (!head) return { entries: [], stoppedBecause: 'the record could not be opened' }
    const all: TimelineEntryView[] = []
    let after: string | null = null
    loaded.value = 0
    do {
      try {
        const query: Record<string, string | number> = { asOf: head.asOf, limit: head.pageSize, ...(after ? { after } : {}) }
        const page: RecordPage = await apiFetch<RecordPage>(`/api/fish/${toValue(fishId)}/record/entries`, { query })
        all.push(...page.entries)
        loaded.value = all.length
        after = page.nextCursor
      }
      catch (error) {
        const offline = error instanceof FetchError && !error.response
        return { entries: all, stoppedBecause: offline ? 'the connection was lost' : describeFetchError(error).text }
      }
    } while (after)
    return { entries: all, stoppedBecause: null }
  }, { server: false, lazy: true })
  return { summary, entries, loaded }
}
