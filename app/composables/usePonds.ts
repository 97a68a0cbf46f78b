import type { ApiResponse } from '~/utils/api-fetch'

// Each answer's type is its route's (Nitro's route table, from the handler), so a page cannot drift from the server.
export function usePonds() {
  return useSavedFetch<ApiResponse<'/api/ponds'>>(() => '/api/ponds', { key: 'ponds' })
}

export function usePond(pondId: MaybeRefOrGetter<string>) {
  return useSavedFetch<ApiResponse<'/api/ponds/:pondId'>>(() => `/api/ponds/${toValue(pondId)}`, { key: `pond-${toValue(pondId)}` })
}

export function usePondFish(pondId: MaybeRefOrGetter<string>) {
  return useSavedFetch<ApiResponse<'/api/ponds/:pondId/fish'>>(() => `/api/ponds/${toValue(pondId)}/fish`, { key: `pond-fish-${toValue(pondId)}` })
}

export function useFish(fishId: MaybeRefOrGetter<string>) {
  return useSavedFetch<ApiResponse<'/api/fish/:fishId'>>(() => `/api/fish/${toValue(fishId)}`, { key: `fish-${toValue(fishId)}` })
}

export function useFishHistory(fishId: MaybeRefOrGetter<string>) {
  return useFetch<ApiResponse<'/api/fish/:fishId/history'>>(() => `/api/fish/${toValue(fishId)}/history`, { key: `fish-history-${toValue(fishId)}` })
}
