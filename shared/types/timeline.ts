// The shapes the timeline routes answer with.
import type { TimelineKind } from '../utils/timeline-schemas'
import type { WeightChangeAlert } from '../utils/condition'
import type { TreatmentSchedule } from '../utils/treatment-schedule'

export interface PersonRef { id: string, name: string }
export interface FishRef { id: string, name: string }

export interface TimelineEntryView {
  id: string
  kind: TimelineKind
  occurredAt: string
  author: PersonRef | null
  data: Record<string, unknown>
  revision: number
  enteredInError: boolean
  errorReason: string | null
  errorBy: string | null
  errorAt: string | null
  /** 'related' when this is a companion note written on the other fish and shown here too. */
  viewpoint: 'subject' | 'related'
  /** For a companion note: the fish on the other side, seen from this timeline. */
  otherFish: FishRef | null
  linkedEntryId: string | null
  photo: { id: string, caption: string, view: string } | null
  derived: {
    conditionK?: number | null
    relativeWeight?: number | null
    prolongedRecovery?: boolean
    analyteFlags?: ('low' | 'high' | null)[]
    treatmentLastDay?: string | null
    /** A treatment given as a number of doses: each dose, given, missed or still due. */
    schedule?: TreatmentSchedule | null
  }
  /** Whether the person asking may amend it or mark it entered in error. */
  canAmend: boolean
  createdAt: string
}

export interface TimelinePage {
  entries: TimelineEntryView[]
  nextCursor: string | null
}

export interface TimelineRevisionView {
  revision: number
  occurredAt: string
  data: Record<string, unknown>
  author: PersonRef
  reason: string | null
  createdAt: string
}

export interface StandingFacts {
  eyes: {
    left: { on: string, entryId: string } | null
    right: { on: string, entryId: string } | null
    summary: string
  }
  problems: { entryId: string, name: string, status: 'active' | 'suspected', onset: string }[]
  /** Courses running today, and those ended in the last 7 days that still have missed doses. */
  treatments: CurrentTreatment[]
  /** The fish's latest anaesthesia (not entered in error); `longRecovery` when recovery took over 30 minutes (common practice). */
  lastAnaesthesia: { at: string, agent: string, concentrationMgL: number, recoveryMinutes: number | null, longRecovery: boolean, entryId: string } | null
  /** Every anaesthesia the fish has had: how many, how many recovered slowly, and the last one's water and induction. */
  anaesthesiaHistory: { count: number, longRecoveries: number, lastWaterTemperatureC: number | null, lastInductionMinutes: number | null }
  latestWeight: { weightG: number, at: string, entryId: string } | null
  latestLength: { lengthCm: number, lengthType: string, at: string, entryId: string } | null
  /** Fulton's K from the latest weighing that has both a weight and a length. */
  latestCondition: { conditionK: number, lengthType: string, at: string, entryId: string } | null
  lastExam: { at: string, entryId: string, by: string, reason: string } | null
  companions: { entryId: string, fish: FishRef, words: string, relation: string }[]
  death: { at: string, cause: string, entryId: string } | null
}

export interface CurrentTreatment {
  entryId: string
  drug: string
  route: string
  dose: number
  doseUnit: string
  startOn: string
  lastDay: string | null
  /** The vet who prescribed it: the instructing vet, or the vet who wrote it; a name typed before vets were chosen from the pond. */
  prescribedBy: string | null
  schedule: { doseCount: number, given: number, missed: number, nextDueAt: string | null, missedDoses: { doseNumber: number, dueAt: string }[] } | null
}

export interface GrowthPoint {
  entryId: string
  at: string
  weightG: number | null
  lengthCm: number | null
  lengthType: string
  conditionK: number | null
}

export interface GrowthMarker {
  entryId: string
  at: string
  kind: 'procedure' | 'treatment' | 'death' | 'companion_death'
  label: string
}

export interface FishGrowth {
  /** Every measurement, or with a long history the ones the chart needs (see `sampled`). */
  points: GrowthPoint[]
  /** How many measurements the fish has in all. */
  totalPoints: number
  /** True when `points` is a shape-keeping sample; `?points=all` gives every one. */
  sampled: boolean
  markers: GrowthMarker[]
  /** Always computed from every weighing, sampled or not. */
  alerts: WeightChangeAlert[]
}

export interface LengthWeightSeries {
  /** The fish's species as the app names it (koi, goldfish, other). */
  species: string
  /** Fits are grouped by scientific name: two "other" species never share a curve. */
  scientificName: string
  /** Fitted on each fish's latest weighing (n = number of fish); b outside 2.5–3.5 is flagged (Froese 2006). */
  fit: { a: number, b: number, r2: number, n: number, bOutsideRange: boolean } | null
  fish: { id: string, name: string, points: { lengthCm: number, weightG: number, at: string }[] }[]
}

export interface PondLengthWeight {
  series: LengthWeightSeries[]
  /** Measurements left out of the fit because the length was not total length. */
  otherLengthTypes: number
}
