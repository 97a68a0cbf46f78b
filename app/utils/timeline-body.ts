// What every per-kind entry body receives. Outside the timeline (the printable record, a revision)
// only `data` and the fish are known; the rest is there when an entry is shown live.
import type { FishRef } from '#shared/types/timeline'
import type { TimelineEntryView } from '~/utils/api-shapes'

export interface EntryBodyContext {
  species: string
  fishName: string
  otherFish?: FishRef | null
  viewpoint?: 'subject' | 'related'
  /** The entry's id, when it is shown live (a dose can then be checked off). */
  entryId?: string
  derived?: TimelineEntryView['derived']
  /** Whether the reader may check off doses here (false in print and history). */
  canRecordDoses?: boolean
  /** Keys to refresh after checking off a dose. */
  refreshKeys?: string[]
  /** The fish and its pond, for a dose ticked off with no connection (it waits in the outbox). */
  fishId?: string
  pondId?: string
}

/** An entry as its body needs it: kind and fields always; id, the other fish and derived facts when shown live. */
export type EntryShown = Pick<TimelineEntryView, 'kind'> & { data: Record<string, unknown> } & Partial<Pick<TimelineEntryView, 'id' | 'otherFish' | 'viewpoint' | 'derived'>>

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type EntryBodyData = Record<string, any>
