import type { ApiResponse } from '~/utils/api-fetch'
import type { TargetInUse, WaterParameter } from '#shared/utils/water-targets'
import type { DecimalMark } from '#shared/utils/decimal'

export interface WaterTargetsAnswer {
  targets: Record<WaterParameter, TargetInUse & { label: string, unit: string }>
  canEdit: boolean
}

export function useWaterTests(pondId: MaybeRefOrGetter<string>) {
  return useSavedFetch<ApiResponse<'/api/ponds/:pondId/water-tests'>>(() => `/api/ponds/${toValue(pondId)}/water-tests`, { key: `water-tests-${toValue(pondId)}` })
}

export function useWaterTargets(pondId: MaybeRefOrGetter<string>) {
  return useSavedFetch<WaterTargetsAnswer>(() => `/api/ponds/${toValue(pondId)}/water-targets`, { key: `water-targets-${toValue(pondId)}` })
}

export function usePondFishEvents(pondId: MaybeRefOrGetter<string>) {
  return useFetch<ApiResponse<'/api/ponds/:pondId/fish-events'>>(() => `/api/ponds/${toValue(pondId)}/fish-events`, { key: `pond-fish-events-${toValue(pondId)}` })
}

/** The person's decimal mark (their account setting). */
export function useDecimalMark() {
  const session = useSessionStore()
  return computed<DecimalMark>(() => session.decimalMark)
}
