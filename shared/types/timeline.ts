// The shapes the timeline routes answer with; a field that is a column takes its type from the Drizzle row
// (shared/types/rows.ts). The growth and length-weight answers have no copy here: the app reads them from
// their routes (`ApiResponse<'/api/fish/:fishId/growth'>`, app/composables/useTimeline.ts).
import type { TimelineKind } from '../utils/timeline-schemas'
import type { TreatmentSchedule } from '../utils/treatment-schedule'
import type { ArchivePersonRow, AsJson, FishRow, TimelineEntryRow, TimelineRevisionRow, UserRow } from './rows'

export type PersonRef = Pick<UserRow, 'id' | 'name'>
export type FishRef = Pick<FishRow, 'id' | 'name'>

/**
 * An entry (or photo) read in from a pond archive: its author as the archive names them, never a local
 * account, with the archive's date and who imported it.
 */
export interface ImportedAuthorship extends Pick<ArchivePersonRow, 'name'> {
  /** Their role in the pond when the archive was made, if the archive says. */
  role: ArchivePersonRow['role']
  archiveMadeAt: string
  importedBy: string
  importedAt: string
}

/** From the row; `kind` also names the photos and pond events the timeline shows beside the entries. */
export interface TimelineEntryView extends AsJson<Pick<TimelineEntryRow, 'id' | 'occurredAt' | 'data' | 'revision' | 'enteredInError'
  | 'errorReason' | 'errorAt' | 'linkedEntryId' | 'createdAt'>> {
  kind: TimelineKind
  /** The local author; null for an imported entry (see `imported`). */
  author: PersonRef | null
  imported: ImportedAuthorship | null
  errorBy: string | null
  /** 'related' when this is a companion note written on the other fish and shown here too. */
  viewpoint: 'subject' | 'related'
  /** For a companion note: the fish on the other side, seen from this timeline. */
  otherFish: FishRef | null
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
}

export interface TimelinePage {
  entries: TimelineEntryView[]
  nextCursor: string | null
}

export interface TimelineRevisionView extends AsJson<Pick<TimelineRevisionRow, 'revision' | 'occurredAt' | 'data' | 'reason' | 'createdAt'>> {
  /** For a revision read in from a pond archive: the archive's person (id of that record), with `imported` true. */
  author: PersonRef & { imported: boolean }
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
