import type { FishListItem, FishProfile, FishEditRecord, PondDetail, PondSummary } from '#shared/types'

export function usePonds() {
  return useSavedFetch<PondSummary[]>(() => '/api/ponds', { key: 'ponds' })
}

export function usePond(pondId: MaybeRefOrGetter<string>) {
  return useSavedFetch<PondDetail>(() => `/api/ponds/${toValue(pondId)}`, { key: `pond-${toValue(pondId)}` })
}

export function usePondFish(pondId: MaybeRefOrGetter<string>) {
  return useSavedFetch<FishListItem[]>(() => `/api/ponds/${toValue(pondId)}/fish`, { key: `pond-fish-${toValue(pondId)}` })
}

export function useFish(fishId: MaybeRefOrGetter<string>) {
  return useSavedFetch<FishProfile>(() => `/api/fish/${toValue(fishId)}`, { key: `fish-${toValue(fishId)}` })
}

export function useFishHistory(fishId: MaybeRefOrGetter<string>) {
  return useFetch<FishEditRecord[]>(() => `/api/fish/${toValue(fishId)}/history`, { key: `fish-history-${toValue(fishId)}` })
}
