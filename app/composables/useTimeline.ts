import type { TimelineEntryView } from '~/utils/api-shapes'
import type { TimelineKind } from '#shared/utils/timeline-schemas'
import type { ApiResponse } from '~/utils/api-fetch'

// The answers' types come from the routes' handlers (Nitro's route table), not from copies written here.
export type FishGrowth = ApiResponse<'/api/fish/:fishId/growth'>
export type GrowthPoint = FishGrowth['points'][number]
export type GrowthMarker = FishGrowth['markers'][number]
export type PondLengthWeight = ApiResponse<'/api/ponds/:pondId/length-weight'>
type TimelinePageAnswer = ApiResponse<'/api/fish/:fishId/timeline'>

export function useFishFacts(fishId: MaybeRefOrGetter<string>) {
  return useSavedFetch<ApiResponse<'/api/fish/:fishId/facts'>>(() => `/api/fish/${toValue(fishId)}/facts`, { key: `fish-facts-${toValue(fishId)}` })
}

/** The chart's sample of a long series by default; `every` (the printed record, "show every measurement") asks for all. */
export function useFishGrowth(fishId: MaybeRefOrGetter<string>, every: MaybeRefOrGetter<boolean> = false) {
  // Kept on the device: the chart opens offline from what was saved (see keepForOffline on the fish page).
  return useSavedFetch<FishGrowth>(() => `/api/fish/${toValue(fishId)}/growth`, {
    // The printed record's full series is cached apart from the profile's sample.
    key: `fish-growth-${toValue(fishId)}${toValue(every) === true ? '-all' : ''}`,
    query: computed(() => (toValue(every) ? { points: 'all' } : {})),
  })
}

export function usePondLengthWeight(pondId: MaybeRefOrGetter<string>) {
  return useFetch<PondLengthWeight>(() => `/api/ponds/${toValue(pondId)}/length-weight`, { key: `pond-length-weight-${toValue(pondId)}` })
}

/** Everything on the profile that an entry can change; refreshed together after a write. */
export function fishRecordKeys(fishId: string) {
  return [`fish-${fishId}`, `fish-facts-${fishId}`, `fish-growth-${fishId}`, `fish-growth-${fishId}-all`, `fish-timeline-${fishId}`, `fish-history-${fishId}`]
}

/** Entries rendered with the profile page; "Show older entries" then brings the API's default page (50). */
export const FIRST_TIMELINE_PAGE = 20

/**
 * The first page comes through useFetch (rendered on the server, refreshed by key); older pages
 * are appended as the person asks for them. Changing the kind filter starts again from the top.
 */
export function useTimeline(fishId: MaybeRefOrGetter<string>) {
  const kinds = ref<TimelineKind[]>([])
  const older = ref<TimelineEntryView[]>([])
  const olderCursor = ref<string | null | undefined>(undefined)
  const loadingMore = ref(false)
  const moreError = ref('')
  // The first page comes with the profile's HTML (and again in its payload): a screen or two of entries keeps a
  // long life's page small on a slow link; older pages are larger, asked for one at a time.
  const first = useSavedFetch<TimelinePageAnswer>(() => `/api/fish/${toValue(fishId)}/timeline`, {
    key: `fish-timeline-${toValue(fishId)}`,
    query: computed(() => ({ limit: FIRST_TIMELINE_PAGE, ...(kinds.value.length ? { kind: kinds.value.join(',') } : {}) })),
  })
  watch(() => first.data.value, () => {
    older.value = []
    olderCursor.value = undefined
  })
  const entries = computed(() => [...(first.data.value?.entries ?? []), ...older.value])
  const nextCursor = computed(() => (olderCursor.value === undefined ? first.data.value?.nextCursor ?? null : olderCursor.value))

  async function loadMore() {
    if (!nextCursor.value || loadingMore.value) return
    loadingMore.value = true
    moreError.value = ''
    try {
      const query: Record<string, string> = { before: nextCursor.value }
      if (kinds.value.length) query.kind = kinds.value.join(',')
      const page = await apiFetch<TimelinePageAnswer>(`/api/fish/${toValue(fishId)}/timeline`, { query })
      older.value = [...older.value, ...page.entries]
      olderCursor.value = page.nextCursor
    }
    catch (error) {
      moreError.value = describeFetchError(error).text
    }
    finally {
      loadingMore.value = false
    }
  }

  return { kinds, entries, nextCursor, loadMore, loadingMore, moreError, pending: first.pending, error: first.error, refresh: first.refresh }
}

export interface PondVet { userId: string, name: string }

/** The pond's vets, for "performed by" and "on the instruction of": chosen, so the record can trace them. */
export function usePondVets(pondId: MaybeRefOrGetter<string>) {
  const members = useSavedFetch<ApiResponse<'/api/ponds/:pondId/members'>>(() => `/api/ponds/${toValue(pondId)}/members`, {
    key: `pond-members-${toValue(pondId)}`,
  })
  const vets = computed<PondVet[]>(() => (members.data.value ?? []).filter(m => m.role === 'vet' && !m.readOnly).map(m => ({ userId: m.userId, name: m.name })))
  return { vets, pending: members.pending }
}

/** The fish's earlier anaesthetics, newest first, shown before the vet starts another. */
export function useEarlierAnaesthetics(fishId: MaybeRefOrGetter<string>) {
  return useFetch<TimelinePageAnswer>(() => `/api/fish/${toValue(fishId)}/timeline`, {
    key: `fish-anaesthetics-${toValue(fishId)}`,
    query: { kind: 'anaesthesia', limit: 20 },
  })
}
