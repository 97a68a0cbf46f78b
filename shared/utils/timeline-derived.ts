// Facts derived from timeline entries rather than typed twice: condition from a measurement,
// out-of-range lab values, a long anaesthetic recovery, which eyes remain, which treatments run.
import { fultonK, relativeWeight } from './condition'
import type { BodySide, CompanionRelation, LengthType } from './timeline-schemas'
import type { TreatmentSchedule } from './treatment-schedule'

export interface MeasurementDerived {
  conditionK: number | null
  /** Only where a standard-weight equation applies: koi, total length from 20 cm (Bister et al. 2000). */
  relativeWeight: number | null
}

export function measurementDerived(data: { weightG?: number, lengthCm?: number, lengthType?: LengthType }, species: string): MeasurementDerived {
  const { weightG, lengthCm } = data
  if (weightG === undefined || lengthCm === undefined) return { conditionK: null, relativeWeight: null }
  return {
    conditionK: fultonK(weightG, lengthCm),
    relativeWeight: (data.lengthType ?? 'total') === 'total' ? relativeWeight(species, weightG, lengthCm * 10) : null,
  }
}

export type AnalyteFlag = 'low' | 'high' | null

/** What the server works out for an entry: only the fields of the entry's kind are present. */
export interface EntryDerived extends Partial<MeasurementDerived> {
  prolongedRecovery?: boolean
  analyteFlags?: AnalyteFlag[]
  treatmentLastDay?: string | null
  /** A treatment given as a number of doses: each dose, given, missed or still due. */
  schedule?: TreatmentSchedule | null
}

export function analyteFlag(analyte: { value: number, low?: number, high?: number }): AnalyteFlag {
  if (analyte.low !== undefined && analyte.value < analyte.low) return 'low'
  if (analyte.high !== undefined && analyte.value > analyte.high) return 'high'
  return null
}

/** Common practice: a fish still not swimming upright 30 minutes after the anaesthetic bath deserves attention. */
export const PROLONGED_RECOVERY_MINUTES = 30

export function isProlongedRecovery(recoveryMinutes: number | undefined): boolean {
  return recoveryMinutes !== undefined && recoveryMinutes > PROLONGED_RECOVERY_MINUTES
}

// ---- eyes -------------------------------------------------------------------------------------

/** An eye removal is a procedure coded 'enucleation'; what the vet wrote in words never decides it. */
export function isEnucleation(data: { code?: unknown }): boolean {
  return data.code === 'enucleation'
}

export interface EyeRemoval { entryId: string, on: string, side: BodySide }
export interface EyeState {
  left: { on: string, entryId: string } | null
  right: { on: string, entryId: string } | null
  /** "left eye removed 2023-04-18; right eye removed 2026-05-02 — no eyes"; empty when both remain. */
  summary: string
}

/** Folds the fish's enucleations (oldest first) into which eyes are gone and since when. */
export function eyeState(removals: readonly EyeRemoval[]): EyeState {
  const state: Omit<EyeState, 'summary'> = { left: null, right: null }
  const sorted = [...removals].sort((a, b) => a.on.localeCompare(b.on))
  for (const removal of sorted) {
    if ((removal.side === 'left' || removal.side === 'both') && !state.left) state.left = { on: removal.on, entryId: removal.entryId }
    if ((removal.side === 'right' || removal.side === 'both') && !state.right) state.right = { on: removal.on, entryId: removal.entryId }
  }
  return { ...state, summary: eyeSummary(state) }
}

/** The eye banner's words; `showDay` prints each date in the reader's style (ISO days when left out). */
export function eyeSummary(state: Omit<EyeState, 'summary'>, showDay: (day: string) => string = day => day): string {
  const { left, right } = state
  if (!left && !right) return ''
  if (left && right && left.on === right.on) return `both eyes removed ${showDay(left.on)} — no eyes`
  const parts = [left && { side: 'left', on: left.on }, right && { side: 'right', on: right.on }]
    .filter((p): p is { side: string, on: string } => Boolean(p))
    .sort((a, b) => a.on.localeCompare(b.on))
    .map(p => `${p.side} eye removed ${showDay(p.on)}`)
  const remaining = left && right ? 'no eyes' : left ? 'right eye only' : 'left eye only'
  return `${parts.join('; ')} — ${remaining}`
}

/** Why an enucleation on this side cannot be recorded, or null when it can. */
export function enucleationConflict(state: EyeState, side: BodySide): string | null {
  const taken = [
    (side === 'left' || side === 'both') && state.left ? `the left eye was already removed on ${state.left.on}` : null,
    (side === 'right' || side === 'both') && state.right ? `the right eye was already removed on ${state.right.on}` : null,
  ].filter(Boolean)
  if (!taken.length) return null
  const text = taken.join(' and ')
  return `${text[0]!.toUpperCase()}${text.slice(1)}: it cannot be removed again`
}

// ---- treatments -------------------------------------------------------------------------------

function addDays(day: string, days: number): string {
  const date = new Date(`${day}T00:00:00Z`)
  date.setUTCDate(date.getUTCDate() + days)
  return date.toISOString().slice(0, 10)
}

type CourseDays = { startOn: string, durationDays?: number, endOn?: string, doseCount?: number, intervalHours?: number }

/**
 * The last day of a treatment, or null when it runs until stopped. A 5-day course from the 1st ends
 * on the 5th; a course given as doses ends on the day its last dose falls (counted from `startOn`).
 */
export function treatmentLastDay(data: CourseDays): string | null {
  if (data.endOn) return data.endOn
  if (data.durationDays !== undefined) return addDays(data.startOn, data.durationDays - 1)
  if (data.doseCount !== undefined) return addDays(data.startOn, Math.floor(((data.doseCount - 1) * (data.intervalHours ?? 0)) / 24))
  return null
}

export function isCurrentTreatment(data: CourseDays, today: string): boolean {
  const last = treatmentLastDay(data)
  return data.startOn <= today && (last === null || today <= last)
}

// ---- companions -------------------------------------------------------------------------------

export const RELATION_WORDS: Record<Exclude<CompanionRelation, 'other'>, { forward: string, reverse: string }> = {
  leads: { forward: 'leads', reverse: 'follows' },
  stays_close: { forward: 'keeps close to', reverse: 'keeps close to' },
  chases: { forward: 'chases', reverse: 'is chased by' },
  avoids: { forward: 'avoids', reverse: 'is avoided by' },
  spawns_with: { forward: 'spawns with', reverse: 'spawns with' },
  parent_of: { forward: 'is a parent of', reverse: 'is an offspring of' },
}

// Relations stored before the list was made general; read, never written.
const EARLIER_RELATION_WORDS: Record<string, { forward: string, reverse: string }> = {
  guides: { forward: 'leads', reverse: 'follows' },
  always_together: { forward: 'keeps close to', reverse: 'keeps close to' },
  aggressive_toward: { forward: 'chases', reverse: 'is chased by' },
}

/** How the relation reads from one fish's side: "Clementine leads Pilot" is "Pilot follows Clementine". */
export function relationWords(relation: CompanionRelation | string, relationText: string | undefined, from: 'subject' | 'related'): string {
  if (relation === 'other') return from === 'subject' ? (relationText ?? 'is linked with') : `is linked with (“${relationText ?? ''}”)`
  const words = RELATION_WORDS[relation as Exclude<CompanionRelation, 'other'>] ?? EARLIER_RELATION_WORDS[relation]
  if (!words) return 'is linked with'
  return words[from === 'subject' ? 'forward' : 'reverse']
}
