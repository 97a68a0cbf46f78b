import type { ApiResponse } from './api-fetch'

// Names for answers that several components pass around, each read from the route that answers it, so a
// change to a handler reaches every component that shows its data.

/** The profile's key facts. */
export type StandingFacts = ApiResponse<'/api/fish/:fishId/facts'>
export type CurrentTreatment = StandingFacts['treatments'][number]

export type TimelinePage = ApiResponse<'/api/fish/:fishId/timeline'>
export type TimelineEntryView = TimelinePage['entries'][number]

export type TimelineRevisionView = ApiResponse<'/api/timeline/:entryId/revisions'>[number]
