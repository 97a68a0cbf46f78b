// What is due: the dates, worked out from facts the record already holds. Days are calendar days
// (YYYY-MM-DD, UTC), compared as text.
import { z } from 'zod'

export const DUE_KINDS = ['recheck', 'treatment_dose', 'health_check', 'water_test'] as const
export type DueKind = typeof DUE_KINDS[number]

export const DUE_KIND_LABELS: Record<DueKind, string> = {
  recheck: 'Recheck',
  treatment_dose: 'Treatment dose',
  health_check: 'Yearly health check',
  water_test: 'Water test',
}

/** The worklist and the digest look this far ahead; the pond page shows everything. */
export const DUE_HORIZON_DAYS = 14
/**
 * A routine check up to three months before the pond's check day counts for that year; one earlier (an
 * autumn check) does not replace the spring one. Our own rule for "one spring check a year" (common practice).
 */
export const HEALTH_CHECK_COUNTS_FROM_DAYS = 90

export function addDays(day: string, days: number): string {
  const date = new Date(`${day.slice(0, 10)}T00:00:00Z`)
  date.setUTCDate(date.getUTCDate() + days)
  return date.toISOString().slice(0, 10)
}

export function dayOf(moment: Date): string {
  return moment.toISOString().slice(0, 10)
}

/**
 * The next yearly health check: the pond's check day (MM-DD) on or after three months past the last
 * routine check, or on or after the day the pond was added when it has had none.
 */
export function nextHealthCheck(checkDay: string, lastCheckOn: string | null, pondSince: string): string {
  const base = lastCheckOn ? addDays(lastCheckOn, HEALTH_CHECK_COUNTS_FROM_DAYS) : pondSince
  const year = Number(base.slice(0, 4))
  const candidate = `${year}-${checkDay}`
  return candidate >= base ? candidate : `${year + 1}-${checkDay}`
}

/** The next water test: the pond's interval after the last one, or after the day the pond was added. */
export function nextWaterTest(intervalDays: number, lastTestedOn: string | null, pondSince: string): string {
  return addDays(lastTestedOn ?? pondSince, intervalDays)
}

export function isOverdue(dueOn: string, today: string) {
  return dueOn < today
}

// A month and day that exists every year: 29 February would skip three years in four.
export const checkDaySchema = z.string('Give a month and day').regex(/^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, 'Use the form MM-DD, e.g. 04-01')
  .refine(value => !Number.isNaN(Date.parse(`2025-${value}T00:00:00Z`)) && new Date(`2025-${value}T00:00:00Z`).toISOString().slice(5, 10) === value, 'Not a day of the year (29 February comes only one year in four)')

export const waterTestIntervalSchema = z.number('Enter a number of days').int('Whole days').min(1, 'At least 1 day').max(365, 'At most 365 days')

export const dueSettingsSchema = z.strictObject({
  dueDigest: z.boolean('Yes or no'),
})
