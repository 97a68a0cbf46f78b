// Facts derived from timeline entries rather than typed twice: condition from a measurement,
// out-of-range lab values, a long anaesthetic recovery, which eyes remain, which treatments run.
import { fultonK, relativeWeight } from './condition'
import type { BodySide, CompanionRelation, LengthType } from './timeline-schemas'

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

/** The last day of a treatment, or null when it runs until stopped. A 5-day course from the 1st ends on the 5th. */
export function treatmentLastDay(data: { startOn: string, durationDays?: number, endOn?: string }): string | null {
  if (data.endOn) return data.endOn
  if (data.durationDays !== undefined) return addDays(data.startOn, data.durationDays - 1)
  return null
}

export function isCurrentTreatment(data: { startOn: string, durationDays?: number, endOn?: string }, today: string): boolean {
  const last = treatmentLastDay(data)
  return data.startOn <= today && (last === null || today <= last)
}

// ---- companions -------------------------------------------------------------------------------

const RELATION_WORDS: Record<Exclude<CompanionRelation, 'other'>, { forward: string, reverse: string }> = {
  guides: { forward: 'guides', reverse: 'is guided by' },
  always_together: { forward: 'is always with', reverse: 'is always with' },
  aggressive_toward: { forward: 'is aggressive toward', reverse: 'is bullied by' },
  avoids: { forward: 'avoids', reverse: 'is avoided by' },
}

/** How the relation reads from one fish's side: "Clementine guides Pilot" is "Pilot is guided by Clementine". */
export function relationWords(relation: CompanionRelation, relationText: string | undefined, from: 'subject' | 'related'): string {
  if (relation === 'other') return from === 'subject' ? (relationText ?? 'is linked with') : `is linked with (“${relationText ?? ''}”)`
  return RELATION_WORDS[relation][from === 'subject' ? 'forward' : 'reverse']
}
