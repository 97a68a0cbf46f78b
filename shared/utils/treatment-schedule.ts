// A treatment course as a schedule: `doseCount` doses `intervalHours` apart, the first at
// `firstDoseAt` (or the entry's own time), each checked off as given in `treatment_doses`.
// A dose whose due time has passed without being recorded as given is missed.

export interface GivenDose {
  doseNumber: number
  givenAt: string
  givenBy: { id: string, name: string } | null
  note: string
}

export type DoseState = 'given' | 'missed' | 'due'

export interface DoseSlot {
  doseNumber: number
  dueAt: string
  state: DoseState
  given: GivenDose | null
}

export interface TreatmentSchedule {
  doseCount: number
  intervalHours: number | null
  slots: DoseSlot[]
  given: number
  missed: number
  /** The first dose not yet given whose time has not passed, or null when none is left. */
  nextDueAt: string | null
}

interface ScheduledCourse { doseCount?: number, intervalHours?: number, firstDoseAt?: string }

const HOUR_MS = 3_600_000

/** When dose n (1-based) is due. */
export function doseDueAt(course: ScheduledCourse, entryOccurredAt: string, doseNumber: number): string {
  const first = new Date(course.firstDoseAt ?? entryOccurredAt).getTime()
  return new Date(first + (doseNumber - 1) * (course.intervalHours ?? 0) * HOUR_MS).toISOString()
}

/** The course's doses with what was given; null for a treatment recorded without a number of doses. */
export function treatmentSchedule(course: ScheduledCourse, entryOccurredAt: string, doses: readonly GivenDose[], now: Date = new Date()): TreatmentSchedule | null {
  if (!course.doseCount) return null
  const byNumber = new Map(doses.map(d => [d.doseNumber, d]))
  const slots: DoseSlot[] = []
  for (let n = 1; n <= course.doseCount; n++) {
    const dueAt = doseDueAt(course, entryOccurredAt, n)
    const given = byNumber.get(n) ?? null
    const state: DoseState = given ? 'given' : new Date(dueAt).getTime() < now.getTime() ? 'missed' : 'due'
    slots.push({ doseNumber: n, dueAt, state, given })
  }
  return {
    doseCount: course.doseCount,
    intervalHours: course.intervalHours ?? null,
    slots,
    given: slots.filter(s => s.state === 'given').length,
    missed: slots.filter(s => s.state === 'missed').length,
    nextDueAt: slots.find(s => s.state === 'due')?.dueAt ?? null,
  }
}
