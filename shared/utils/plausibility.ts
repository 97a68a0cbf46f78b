// Plausibility of a new weight or length against the fish's species and its own recent record.
// These are warnings, never refusals: a fish can be unusual, and a warned value is saved once the
// person confirms it. The same rule runs for a typed measurement (server, before saving) and for
// every row of a spreadsheet import (preview and import).
import { z } from 'zod'
import { fultonK } from './condition'
import type { DecimalMark } from './decimal'
import { formatLength, formatMass } from './units'

export const PLAUSIBILITY_CODES = ['condition_factor', 'length_shrank', 'weight_jump'] as const
export type PlausibilityCode = typeof PLAUSIBILITY_CODES[number]

/**
 * Thresholds (common practice, not a published standard):
 * - an adult fish does not get shorter; a total length more than 5 % below one recorded in the six
 *   weeks before is more likely a misread ruler or the wrong fish;
 * - a weight more than 30 % away from a weighing less than 30 days earlier is more likely a typing
 *   slip, the wrong unit or the wrong fish than growth or wasting;
 * - koi and goldfish are counted as adults from their third year.
 */
export const PLAUSIBILITY_THRESHOLDS = {
  lengthShrinkPercent: 5,
  lengthWindowDays: 42,
  weightChangePercent: 30,
  weightWindowDays: 30,
  adultFromAgeYears: 3,
} as const

export interface ConditionRange { low: number, high: number, source: string }

/**
 * Usual Fulton's K (100 · W / L³, g and cm, total length) of fish kept in ponds. No published range
 * covers pond koi or goldfish, so these are common practice (values recalled, not read from a
 * table): koi follow common carp, whose K from total length mostly lies between 1 and 2 and
 * rises in well-fed, deep-bodied koi; goldfish range widely because round fancy varieties with long
 * fins are heavy for their total length. Other species get no range: nothing to compare with.
 * Only total length is checked: K from standard or fork length reads higher for the same fish.
 */
export const CONDITION_RANGES: Record<string, ConditionRange> = {
  koi: { low: 1.0, high: 2.5, source: 'common practice' },
  goldfish: { low: 1.0, high: 4.5, source: 'common practice' },
}

export const plausibilityWarningSchema = z.strictObject({
  code: z.enum(PLAUSIBILITY_CODES),
  message: z.string().max(500),
  value: z.number().optional(),
  earlierValue: z.number().optional(),
  earlierAt: z.string().max(40).optional(),
  low: z.number().optional(),
  high: z.number().optional(),
})
export type PlausibilityWarning = z.infer<typeof plausibilityWarningSchema>

export interface MeasurementToCheck {
  occurredAt: string | Date
  weightG?: number
  lengthCm?: number
  lengthType?: 'total' | 'fork' | 'standard'
}

export interface FishToCheck {
  species: string
  hatchYear: number | null
}

export interface PlausibilityStyle { units: 'metric' | 'us', decimalMark: DecimalMark }

const DAY_MS = 86_400_000
const time = (value: string | Date) => (value instanceof Date ? value.getTime() : Date.parse(value))
const day = (value: string | Date) => new Date(time(value)).toISOString().slice(0, 10)
const percent = (value: number) => `${Math.abs(value).toFixed(0)} %`
const isAmount = (value: unknown): value is number => typeof value === 'number' && Number.isFinite(value) && value > 0

function isAdultAt(fish: FishToCheck, at: string | Date) {
  // Without a hatch year the fish is taken as grown: most fish of unknown age were bought grown.
  if (fish.hatchYear == null) return true
  return new Date(time(at)).getUTCFullYear() - fish.hatchYear >= PLAUSIBILITY_THRESHOLDS.adultFromAgeYears
}

/**
 * Warnings for one new measurement, given the fish's earlier measurements (entries in error left
 * out by the caller; later ones are ignored here). Each message names the numbers it compared.
 */
export function measurementWarnings(
  fish: FishToCheck,
  measurement: MeasurementToCheck,
  earlier: readonly MeasurementToCheck[],
  style: PlausibilityStyle = { units: 'metric', decimalMark: 'point' },
): PlausibilityWarning[] {
  const warnings: PlausibilityWarning[] = []
  const at = time(measurement.occurredAt)
  if (!Number.isFinite(at)) return warnings
  const mass = (g: number) => formatMass(g, style.units, style.decimalMark)
  const length = (cm: number) => formatLength(cm, style.units, style.decimalMark)
  const k = (value: number) => value.toFixed(2).replace('.', style.decimalMark === 'comma' ? ',' : '.')
  const lengthType = measurement.lengthType ?? 'total'
  const before = earlier
    .filter(m => Number.isFinite(time(m.occurredAt)) && time(m.occurredAt) < at)
    .sort((a, b) => time(b.occurredAt) - time(a.occurredAt))

  const range = CONDITION_RANGES[fish.species]
  if (range && lengthType === 'total' && isAmount(measurement.weightG) && isAmount(measurement.lengthCm)) {
    const conditionK = fultonK(measurement.weightG, measurement.lengthCm)!
    if (conditionK < range.low || conditionK > range.high) {
      warnings.push({
        code: 'condition_factor', value: Number(conditionK.toFixed(3)), low: range.low, high: range.high,
        message: `${mass(measurement.weightG)} at ${length(measurement.lengthCm)} total length gives a condition factor K of ${k(conditionK)}, outside the usual ${k(range.low)}–${k(range.high)} for ${fish.species} (${range.source}). Check the weight, the length and the unit.`,
      })
    }
  }

  if (isAmount(measurement.lengthCm) && isAdultAt(fish, measurement.occurredAt)) {
    const windowStart = at - PLAUSIBILITY_THRESHOLDS.lengthWindowDays * DAY_MS
    const longest = before
      .filter(m => time(m.occurredAt) >= windowStart && isAmount(m.lengthCm) && (m.lengthType ?? 'total') === lengthType)
      .reduce<MeasurementToCheck | undefined>((best, m) => (!best || m.lengthCm! > best.lengthCm! ? m : best), undefined)
    if (longest) {
      const change = (100 * (measurement.lengthCm - longest.lengthCm!)) / longest.lengthCm!
      if (change < -PLAUSIBILITY_THRESHOLDS.lengthShrinkPercent) {
        warnings.push({
          code: 'length_shrank', value: measurement.lengthCm, earlierValue: longest.lengthCm!, earlierAt: day(longest.occurredAt),
          message: `${length(measurement.lengthCm)} is ${percent(change)} shorter than the ${length(longest.lengthCm!)} recorded on ${day(longest.occurredAt)}; an adult fish does not shrink by more than ${PLAUSIBILITY_THRESHOLDS.lengthShrinkPercent} % (common practice). Check the ruler and that this is the same fish.`,
        })
      }
    }
  }

  if (isAmount(measurement.weightG)) {
    const last = before.find(m => isAmount(m.weightG))
    if (last && at - time(last.occurredAt) <= PLAUSIBILITY_THRESHOLDS.weightWindowDays * DAY_MS) {
      const change = (100 * (measurement.weightG - last.weightG!)) / last.weightG!
      if (Math.abs(change) > PLAUSIBILITY_THRESHOLDS.weightChangePercent) {
        const days = Math.round((at - time(last.occurredAt)) / DAY_MS)
        warnings.push({
          code: 'weight_jump', value: measurement.weightG, earlierValue: last.weightG!, earlierAt: day(last.occurredAt),
          message: `${mass(measurement.weightG)} is ${percent(change)} ${change > 0 ? 'more' : 'less'} than the ${mass(last.weightG!)} weighed ${days === 0 ? 'the same day' : `${days} ${days === 1 ? 'day' : 'days'} earlier`} (${day(last.occurredAt)}); more than ${PLAUSIBILITY_THRESHOLDS.weightChangePercent} % within ${PLAUSIBILITY_THRESHOLDS.weightWindowDays} days is unusual (common practice). Check the unit and that this is the same fish.`,
        })
      }
    }
  }
  return warnings
}

/** Whether every warning was acknowledged by its code (a new kind of warning needs a new confirmation). */
export function allAcknowledged(warnings: readonly PlausibilityWarning[], acknowledged: readonly string[] | undefined) {
  return warnings.every(w => acknowledged?.includes(w.code))
}
