import { and, eq, gte, lt, ne } from 'drizzle-orm'
import type { CurrentUser } from '#shared/types'
import { PLAUSIBILITY_THRESHOLDS, measurementWarnings, type MeasurementToCheck, type PlausibilityWarning } from '#shared/utils/plausibility'
import type { Tx } from './db'

type Reader = Pick<Tx, 'select'>
const DAY_MS = 86_400_000
const WINDOW_DAYS = Math.max(PLAUSIBILITY_THRESHOLDS.lengthWindowDays, PLAUSIBILITY_THRESHOLDS.weightWindowDays)

/** The fish's own measurements in the weeks before `at` (entries in error left out), as the shared rule reads them. */
async function earlierMeasurements(db: Reader, fishId: string, at: Date, exceptEntryId?: string): Promise<MeasurementToCheck[]> {
  const conditions = [
    eq(schema.timelineEntries.fishId, fishId),
    eq(schema.timelineEntries.kind, 'measurement'),
    eq(schema.timelineEntries.enteredInError, false),
    gte(schema.timelineEntries.occurredAt, new Date(at.getTime() - WINDOW_DAYS * DAY_MS)),
    lt(schema.timelineEntries.occurredAt, at),
  ]
  if (exceptEntryId) conditions.push(ne(schema.timelineEntries.id, exceptEntryId))
  const rows = await db.select({ occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data })
    .from(schema.timelineEntries).where(and(...conditions))
  return rows.map(r => ({ occurredAt: r.occurredAt, ...(r.data as Omit<MeasurementToCheck, 'occurredAt'>) }))
}

/** The plausibility warnings for a measurement about to be written, in the author's units and decimal mark. */
export async function measurementPlausibility(
  db: Reader,
  fish: { id: string, species: string, hatchYear: number | null },
  measurement: MeasurementToCheck & { occurredAt: Date },
  author: Pick<CurrentUser, 'units' | 'decimalMark'>,
  exceptEntryId?: string,
): Promise<PlausibilityWarning[]> {
  const earlier = await earlierMeasurements(db, fish.id, measurement.occurredAt, exceptEntryId)
  return measurementWarnings(fish, measurement, earlier, { units: author.units, decimalMark: author.decimalMark })
}

/** The answer when warnings were not yet confirmed: nothing was written; resend with `acknowledgedWarnings`. */
export function unconfirmedWarnings(warnings: PlausibilityWarning[]) {
  return {
    statusCode: 409,
    statusMessage: 'Please confirm',
    message: 'This measurement looks unusual. Check it, then save it anyway if it is right.',
    warnings,
    data: { warnings },
  }
}
