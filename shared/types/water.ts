import type { MeasuredWaterParameter, WaterFlag, WaterParameter } from '../utils/water-targets'

export type WaterReadingValues = Record<MeasuredWaterParameter, number | null>

/** One water test as the API answers it, readings in canonical units (null when not measured). */
export type WaterTestView = WaterReadingValues & {
  id: string
  pondId: string
  testedAt: string
  testedBy: { id: string, name: string }
  notes: string
  unionizedAmmoniaNMgL: number | null
  flags: Partial<Record<WaterParameter, WaterFlag>>
  createdAt: string
}
