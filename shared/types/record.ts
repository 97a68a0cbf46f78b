// The shapes the health record routes answer with.
import type { PersonRef, TimelineEntryView } from './timeline'

export interface RecordVet {
  name: string
  /** Clinical entries this person wrote on the fish (exams, procedures, anaesthesia, treatments, lab results, confirmed problems). */
  entries: number
  firstAt: string
  lastAt: string
  /** Named as author by a pond archive this pond was imported from: not a person with an account here. */
  imported: boolean
}

export interface HealthRecordSummary {
  /** The moment the record was opened; it holds every entry written up to then. */
  asOf: string
  /** Entries in the record (entries entered in error included: they stay visible, struck through). */
  entryCount: number
  pond: { id: string, name: string }
  owners: PersonRef[]
  vets: RecordVet[]
  pageSize: number
}

export interface HealthRecordPage {
  entries: TimelineEntryView[]
  nextCursor: string | null
}
