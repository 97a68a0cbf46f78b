// The shapes the pond care routes answer with: whole-pond events, vet visits and what is due.
import type { WholePondEventKind } from '../utils/whole-pond-events'
import type { DueKind } from '../utils/due'
import type { VisitPurpose } from '../utils/visits'
import type { PersonRef, FishRef } from './timeline'

export interface PondEventView {
  id: string
  kind: WholePondEventKind
  occurredAt: string
  author: PersonRef
  visitId: string | null
  volumeLitres: number | null
  data: Record<string, unknown>
  enteredInError: boolean
  errorReason: string | null
  errorBy: string | null
  /** The fish living in the pond at that moment: the timelines it appears on. */
  fish: FishRef[]
}

/** One thing due, as GET /api/due answers it. */
export interface DueItem {
  pondId: string
  pondName: string
  fishId?: string
  kind: DueKind
  dueOn: string
  overdue: boolean
}

/** The same with what the pages show beside it. */
export interface DueItemDetail extends Omit<DueItem, 'fishId'> {
  fishId: string | null
  fishName: string | null
  /** The entry that set a recheck. */
  entryId: string | null
  /** A few words on why it is due. */
  about: string
}

export interface VisitView {
  id: string
  pondId: string
  vet: PersonRef
  visitedOn: string
  purpose: VisitPurpose
  findings: string
  openedAt: string
  closedAt: string | null
  fishSeen: FishRef[]
}

/** A line per entry written during the visit, in words. */
export interface VisitEntryLine {
  id: string
  fish: FishRef
  kind: string
  occurredAt: string
  text: string
  enteredInError: boolean
}

export interface VisitWaterLine {
  id: string
  testedAt: string
  /** "pH 7.9 (ok)", "TAN 1.2 mg/L (high)"... */
  values: { label: string, value: string, flag: 'low' | 'ok' | 'high' | null }[]
}

export interface VisitSummary extends VisitView {
  pondName: string
  entries: VisitEntryLine[]
  pondEvents: PondEventView[]
  waterTests: VisitWaterLine[]
  due: DueItemDetail[]
}
